// @vitest-environment node
// The console's import rules, read from its source: it is a client of the server's API and never
// imports server code; from shared/ it takes zod contracts as types only, so zod stays out of its
// bundle, and values only from shared/access.ts (roles, key scopes), which itself imports nothing.
// One import style: relative paths (no alias). Source: DEVELOPERS.md, "The shape of the system".
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../..');
const consoleSrc = path.join(root, 'console/src');
const sharedDir = path.join(root, 'shared');
const serverDir = path.join(root, 'server');
const access = path.join(sharedDir, 'access.ts');
/** The operation catalogue: plain data (ids, titles, units) importing only a type from access.ts. */
const catalogue = path.join(sharedDir, 'operations.ts');

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) return sourceFiles(p);
    return /\.(ts|vue)$/.test(e.name) ? [p] : [];
  });
}

interface ImportStatement {
  file: string;
  typeOnly: boolean;
  specifier: string;
}

/** Static imports and re-exports (`import type {…} from`, `export … from`, bare `import '…'`) and dynamic `import('…')`. */
function importsOf(file: string): ImportStatement[] {
  const text = fs.readFileSync(file, 'utf8');
  const found: ImportStatement[] = [];
  const statement =
    /^\s*(?:import|export)\s+(type\s+)?(?:[\w$]+\s*,\s*)?(?:\{[^}]*\}|\*(?:\s+as\s+[\w$]+)?|[\w$]+)\s+from\s+['"]([^'"]+)['"]/gm;
  for (const m of text.matchAll(statement)) found.push({ file, typeOnly: Boolean(m[1]), specifier: m[2]! });
  for (const m of text.matchAll(/^\s*import\s+['"]([^'"]+)['"]/gm))
    found.push({ file, typeOnly: false, specifier: m[1]! });
  for (const m of text.matchAll(/\bimport\(\s*['"]([^'"]+)['"]\s*\)/g))
    found.push({ file, typeOnly: false, specifier: m[1]! });
  return found;
}

/** The file a relative specifier names (`.js` in a specifier is the `.ts` source). */
function target(s: ImportStatement): string | null {
  if (!s.specifier.startsWith('.')) return null;
  return path.resolve(path.dirname(s.file), s.specifier).replace(/\.js$/, '.ts');
}

const imports = sourceFiles(consoleSrc).flatMap(importsOf);
const rel = (p: string) => path.relative(root, p);

describe('console import rules', () => {
  it('finds the console’s imports at all (the scan reads what it should)', () => {
    expect(imports.filter((s) => target(s)?.startsWith(sharedDir)).length).toBeGreaterThan(20);
  });

  it('imports no server code', () => {
    const offenders = imports.filter((s) => target(s)?.startsWith(serverDir + path.sep));
    expect(offenders.map((s) => `${rel(s.file)} → ${s.specifier}`)).toEqual([]);
  });

  it('takes only types from shared/, except the zod-free role and scope lists and the operation catalogue', () => {
    const offenders = imports.filter((s) => {
      const t = target(s);
      return t?.startsWith(sharedDir + path.sep) && t !== access && t !== catalogue && !s.typeOnly;
    });
    expect(offenders.map((s) => `${rel(s.file)} → ${s.specifier}`)).toEqual([]);
  });

  it('keeps shared/access.ts free of imports, so importing it brings nothing else along', () => {
    expect(importsOf(access)).toEqual([]);
  });

  it('keeps the operation catalogue to a type import of access.ts, so it brings no zod along', () => {
    expect(importsOf(catalogue).map((s) => ({ typeOnly: s.typeOnly, specifier: s.specifier }))).toEqual([
      { typeOnly: true, specifier: './access.js' },
    ]);
  });

  it('reaches shared/ by relative paths only, not through an alias', () => {
    const aliased = imports.filter(
      (s) => s.specifier.startsWith('@shared') || s.specifier.startsWith('shared/'),
    );
    expect(aliased.map((s) => `${rel(s.file)} → ${s.specifier}`)).toEqual([]);
  });
});
