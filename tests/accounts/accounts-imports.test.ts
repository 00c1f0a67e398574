// The accounts room's import rules, read from its source: the account services (keys, metering,
// users, sessions, credentials, audit …) take deps or db and plain values, so they import neither
// Express nor anything of the HTTP or console layers; and the console's user and auth routes leave
// storage to those services. Source: DEVELOPERS.md, "The shape of the system" (room table).
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../..');
const accountsDir = path.join(root, 'server/accounts');
const httpDir = path.join(root, 'server/http');
const consoleDir = path.join(root, 'server/console');
const dbDir = path.join(root, 'server/db');

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) return sourceFiles(p);
    return e.name.endsWith('.ts') ? [p] : [];
  });
}

interface ImportStatement {
  file: string;
  specifier: string;
}

/** Static imports and re-exports (type-only ones included) and dynamic `import('…')`. */
function importsOf(file: string): ImportStatement[] {
  const text = fs.readFileSync(file, 'utf8');
  const found: ImportStatement[] = [];
  const statement =
    /^\s*(?:import|export)\s+(?:type\s+)?(?:[\w$]+\s*,\s*)?(?:\{[^}]*\}|\*(?:\s+as\s+[\w$]+)?|[\w$]+)\s+from\s+['"]([^'"]+)['"]/gm;
  for (const m of text.matchAll(statement)) found.push({ file, specifier: m[1]! });
  for (const m of text.matchAll(/^\s*import\s+['"]([^'"]+)['"]/gm)) found.push({ file, specifier: m[1]! });
  for (const m of text.matchAll(/\bimport\(\s*['"]([^'"]+)['"]\s*\)/g))
    found.push({ file, specifier: m[1]! });
  return found;
}

/** The file a relative specifier names (`.js` in a specifier is the `.ts` source). */
function target(s: ImportStatement): string | null {
  if (!s.specifier.startsWith('.')) return null;
  return path.resolve(path.dirname(s.file), s.specifier).replace(/\.js$/, '.ts');
}

const rel = (p: string) => path.relative(root, p);
const show = (list: ImportStatement[]) => list.map((s) => `${rel(s.file)} → ${s.specifier}`);
const accountImports = sourceFiles(accountsDir).flatMap(importsOf);

describe('accounts import rules', () => {
  it('finds the services’ imports at all (the scan reads what it should)', () => {
    expect(accountImports.filter((s) => target(s)?.startsWith(dbDir + path.sep)).length).toBeGreaterThan(5);
  });

  it('keeps Express (and its middleware packages) out of every account service', () => {
    const offenders = accountImports.filter((s) => /^(express|cookie-parser)(\/|-|$)/.test(s.specifier));
    expect(show(offenders)).toEqual([]);
  });

  it('imports nothing of the HTTP layer or the console', () => {
    const offenders = accountImports.filter((s) => {
      const t = target(s);
      return t !== null && (t.startsWith(httpDir + path.sep) || t.startsWith(consoleDir + path.sep));
    });
    expect(show(offenders)).toEqual([]);
  });

  it('leaves the console user and auth routes without storage of their own (they call the services)', () => {
    const routeFiles = [path.join(consoleDir, 'users.ts'), ...sourceFiles(path.join(consoleDir, 'auth'))];
    const offenders = routeFiles
      .flatMap(importsOf)
      .filter((s) => s.specifier === 'drizzle-orm' || target(s)?.startsWith(dbDir + path.sep));
    expect(show(offenders)).toEqual([]);
  });
});
