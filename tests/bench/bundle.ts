/**
 * Benchmark: gzipped size of the console's initial load — the entry script and stylesheets that
 * console/dist/index.html references, plus every chunk they import statically (transitively),
 * and the CSS Vite links for them. Lazy chunks (dynamic `import()`, route views) are not counted.
 * Target: < 400 kB gzipped. Fonts referenced by that CSS are listed apart (woff2 is already
 * compressed and the browser fetches only the faces a page uses).
 *
 * Builds the console with `npm run build` when console/dist is missing (set BUNDLE_REBUILD=1 to
 * force a build; BUNDLE_DIST=<folder> measures another build output). Run alone with `npx tsx tests/bench/bundle.ts`.
 */
import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import zlib from 'node:zlib';
import { ensureConsoleBuilt } from '../support/console-build.js';

const ROOT = path.resolve(import.meta.dirname, '../..');
const DIST = process.env.BUNDLE_DIST
  ? path.resolve(process.env.BUNDLE_DIST)
  : path.join(ROOT, 'console', 'dist');
export const INITIAL_LOAD_TARGET_KB = 400;

export interface BundleFile {
  file: string;
  kind: 'js' | 'css' | 'font';
  bytes: number;
  gzipBytes: number;
}

export interface BundleReport {
  initial: BundleFile[];
  fonts: BundleFile[];
  /** JS + CSS of the initial load, gzipped, kB (1 kB = 1000 bytes). */
  initialGzipKb: number;
  lazyChunkCount: number;
}

function gzipSize(buf: Buffer): number {
  // Level 9, as a static server or CDN precompresses (common practice).
  return zlib.gzipSync(buf, { level: 9 }).length;
}

/** Resolves a URL from index.html or a chunk ("/console/assets/x.js", "./x.js") to a file in dist. */
function resolveAsset(ref: string, fromFile: string | undefined): string | undefined {
  const clean = ref.split(/[?#]/)[0] ?? ref;
  if (/^(?:[a-z]+:)?\/\//i.test(clean) || clean.startsWith('data:')) return undefined;
  if (clean.startsWith('.') && fromFile) return path.resolve(path.dirname(fromFile), clean);
  // Absolute URLs carry the console's base path (e.g. /console/): match on the part after it.
  const rel = clean.replace(/^\/+/, '');
  for (let parts = rel.split('/'); parts.length > 0; parts = parts.slice(1)) {
    const candidate = path.join(DIST, ...parts);
    if (fs.existsSync(candidate) && fs.statSync(candidate).isFile()) return candidate;
  }
  return undefined;
}

/** Static imports of a built ES module chunk: `import … from "x"`, `import "x"`, `export … from "x"`. */
export function staticImports(source: string): string[] {
  const found = new Set<string>();
  // `import(` (dynamic) is excluded by requiring a quote or an identifier/brace after `import`.
  const re = /(?:^|[;\s}])(?:import|export)\s*(?:[\w$*{}\s,]+?\s*from\s*)?["']([^"']+\.m?js)["']/g;
  for (let m = re.exec(source); m; m = re.exec(source)) if (m[1]) found.add(m[1]);
  return [...found];
}

export function measureBundle(): BundleReport {
  const indexHtml = path.join(DIST, 'index.html');
  const html = fs.readFileSync(indexHtml, 'utf8');
  const queue: string[] = [];
  const css = new Set<string>();
  for (const m of html.matchAll(/<script\b[^>]*\bsrc="([^"]+)"[^>]*>/g)) {
    const f = m[1] && resolveAsset(m[1], indexHtml);
    if (f) queue.push(f);
  }
  for (const m of html.matchAll(/<link\b[^>]*>/g)) {
    const tag = m[0];
    const href = /\bhref="([^"]+)"/.exec(tag)?.[1];
    const f = href && resolveAsset(href, indexHtml);
    if (!f) continue;
    if (/\brel="stylesheet"/.test(tag)) css.add(f);
    else if (/\brel="modulepreload"/.test(tag)) queue.push(f);
  }
  const js = new Set<string>();
  while (queue.length > 0) {
    const file = queue.pop() as string;
    if (js.has(file) || !file.endsWith('.js')) continue;
    js.add(file);
    for (const ref of staticImports(fs.readFileSync(file, 'utf8'))) {
      const dep = resolveAsset(ref, file);
      if (dep) queue.push(dep);
    }
  }
  const describe = (file: string, kind: BundleFile['kind']): BundleFile => {
    const buf = fs.readFileSync(file);
    return { file: path.relative(DIST, file), kind, bytes: buf.length, gzipBytes: gzipSize(buf) };
  };
  const initial = [...[...js].map((f) => describe(f, 'js')), ...[...css].map((f) => describe(f, 'css'))];
  const fontFiles = new Set<string>();
  for (const file of css) {
    for (const m of fs
      .readFileSync(file, 'utf8')
      .matchAll(/url\(\s*["']?([^"')?#]+\.woff2)(?:[?#][^"')]*)?["']?\s*\)/g)) {
      const f = m[1] && resolveAsset(m[1], file);
      if (f) fontFiles.add(f);
    }
  }
  const allJs = fs
    .readdirSync(path.join(DIST, 'assets'))
    .filter((f) => f.endsWith('.js'))
    .map((f) => path.join(DIST, 'assets', f));
  return {
    initial,
    fonts: [...fontFiles].map((f) => describe(f, 'font')),
    initialGzipKb: initial.reduce((s, f) => s + f.gzipBytes, 0) / 1000,
    lazyChunkCount: allJs.filter((f) => !js.has(f)).length,
  };
}

function ensureBuilt(): void {
  // BUNDLE_DIST names a build made elsewhere: measure it as it is.
  if (process.env.BUNDLE_DIST) return;
  ensureConsoleBuilt({ force: process.env.BUNDLE_REBUILD === '1' });
}

export async function runBundleBench(): Promise<void> {
  if (!fs.existsSync(path.join(ROOT, 'console', 'vite.config.ts'))) {
    console.log('console/ not present: nothing to measure');
    return;
  }
  ensureBuilt();
  const r = measureBundle();
  const kb = (n: number) => (n / 1000).toFixed(1);
  for (const f of [...r.initial].sort((a, b) => b.gzipBytes - a.gzipBytes)) {
    console.log(
      `  ${f.kind.padEnd(4)} ${kb(f.gzipBytes).padStart(7)} kB gz  (${kb(f.bytes)} kB raw)  ${f.file}`,
    );
  }
  const fontKb = r.fonts.reduce((s, f) => s + f.bytes, 0) / 1000;
  console.log(
    `initial load (entry JS + CSS + static imports): ${r.initialGzipKb.toFixed(1)} kB gzipped; ` +
      `target < ${INITIAL_LOAD_TARGET_KB} kB → ${r.initialGzipKb < INITIAL_LOAD_TARGET_KB ? 'met' : 'NOT met'}`,
  );
  const icons = r.fonts.filter((f) => /materialdesignicons/i.test(f.file));
  if (icons.length > 0)
    console.log(
      `  + icon font fetched on the first page with an icon: ${kb(icons.reduce((s, f) => s + f.bytes, 0))} kB woff2 ` +
        `(initial load with it: ${(r.initialGzipKb + icons.reduce((s, f) => s + f.bytes, 0) / 1000).toFixed(1)} kB)`,
    );
  console.log(
    `  not counted: ${r.lazyChunkCount} lazy JS chunks; ${r.fonts.length} woff2 font files referenced by the CSS ` +
      `(${fontKb.toFixed(1)} kB, fetched on demand per face)`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runBundleBench();
}
