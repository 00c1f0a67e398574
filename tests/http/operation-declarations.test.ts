// Each /v1 operation is declared once (server/http/v1/operations/), with its id, scope and cost
// in the plain-data catalogue (shared/operations.ts); the router, the OpenAPI document, metering
// and the batch dispatcher are derived from the declarations. These checks keep it so: an
// operation's path or id spelled a second time in server/ or shared/ would drift from the one
// the declaration states.
import fs from 'node:fs';
import path from 'node:path';
import { sql } from 'drizzle-orm';
import request from 'supertest';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';
import { KEY_SCOPES } from '../../shared/access.js';
import { batchOperations } from '../../shared/contracts/index.js';
import { batchOperationNames, operationIds, operationList } from '../../shared/operations.js';
import { buildOpenApiDocument } from '../../server/http/openapi.js';
import { routerPath } from '../../server/http/v1/operation.js';
import { v1Operations } from '../../server/http/v1/operations/index.js';
import { makeHarness } from './helpers.js';

const ROOT = path.resolve(import.meta.dirname, '../..');

function sourceFiles(dir: string): string[] {
  return fs.readdirSync(path.join(ROOT, dir), { withFileTypes: true }).flatMap((entry) => {
    const rel = path.join(dir, entry.name);
    if (entry.isDirectory()) return sourceFiles(rel);
    return /\.ts$/.test(entry.name) && !/\.test\.ts$/.test(entry.name) ? [rel] : [];
  });
}

/** Every string literal (and template literal piece) of a file, as written. */
function literals(file: string): string[] {
  const text = fs.readFileSync(path.join(ROOT, file), 'utf8');
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, false, ts.ScriptKind.TS);
  const out: string[] = [];
  const visit = (node: ts.Node): void => {
    if (
      ts.isStringLiteral(node) ||
      ts.isNoSubstitutionTemplateLiteral(node) ||
      ts.isTemplateHead(node) ||
      ts.isTemplateMiddle(node) ||
      ts.isTemplateTail(node)
    ) {
      out.push(node.text);
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  return out;
}

const files = [...sourceFiles('server'), ...sourceFiles('shared')].map((file) => ({
  file,
  literals: literals(file),
}));

/** The files holding a literal that `matches`. */
function filesSpelling(matches: (literal: string) => boolean, where = (_file: string) => true): string[] {
  return files.filter((f) => where(f.file) && f.literals.some(matches)).map((f) => f.file);
}

describe('one declaration per /v1 operation', () => {
  it('spells each operation id in exactly one source file of server/ and shared/: the catalogue', () => {
    for (const id of operationIds) {
      // The batch operation's id is also the name of the key scope it needs (shared/access.ts).
      const notScopes = (file: string) =>
        !((KEY_SCOPES as readonly string[]).includes(id) && file === path.join('shared', 'access.ts'));
      expect(
        filesSpelling((l) => l === id, notScopes),
        id,
      ).toEqual([path.join('shared', 'operations.ts')]);
    }
  });

  it('spells each /v1 path in exactly one source file of server/ and shared/: its declaration', () => {
    for (const decl of v1Operations) {
      const full = [decl.path, decl.path.replace(/\{(\w+)\}/g, ':$1')];
      const relative = [routerPath(decl.path), decl.path.replace(/^\/v1/, '')];
      const spells = (forms: string[]) => (l: string) =>
        forms.some((f) => l === f || l.startsWith(`${f}?`) || l.startsWith(`${f}#`));
      const anywhere = filesSpelling(spells(full));
      // A path relative to /v1 would be spelled by a router in server/http (the console API has
      // its own paths such as /liquors).
      const inHttp = filesSpelling(spells(relative), (file) => file.startsWith(path.join('server', 'http')));
      const spelledIn = [...new Set([...anywhere, ...inHttp])];
      expect(spelledIn, decl.path).toHaveLength(1);
      expect(spelledIn[0], decl.path).toMatch(/^server\/http\/v1\/operations\//);
    }
  });

  it('declares each catalogued operation exactly once and nothing outside the catalogue', () => {
    const declared = v1Operations.map((d) => d.operation.id).sort();
    expect(declared).toEqual([...operationIds].sort());
    for (const decl of v1Operations) {
      expect(operationList, decl.operation.id).toContain(decl.operation);
    }
  });

  it('documents every declared operation in OpenAPI under its path, method and operationId, and nothing else', () => {
    const doc = buildOpenApiDocument() as unknown as {
      paths: Record<string, Record<string, { operationId: string }>>;
    };
    const documented = Object.entries(doc.paths)
      .flatMap(([p, item]) => Object.entries(item).map(([m, op]) => `${m} ${p} ${op.operationId}`))
      .sort();
    expect(documented).toEqual(v1Operations.map((d) => `${d.method} ${d.path} ${d.openApiName}`).sort());
    const names = v1Operations.map((d) => d.openApiName);
    expect(new Set(names).size).toBe(names.length);
  });

  it('accepts as batch operations exactly the short names the declarations carry, each runnable in a batch', () => {
    expect([...batchOperations]).toEqual([...batchOperationNames]);
    expect([...batchOperations]).toEqual([
      'steam-saturation',
      'steam-state',
      'liquor-boiling-point',
      'liquor-enthalpy',
      'single-effect',
      'multiple-effect',
      'mechanical-vapor-recompression',
      'overall-coefficient',
    ]);
    for (const name of batchOperations) {
      const decl = v1Operations.filter((d) => 'batchName' in d.operation && d.operation.batchName === name);
      // one declaration per name, and one that computes (`run`, or an `engine` part that may run in
      // the calculation pool), not one that answers the HTTP request itself
      expect(decl, name).toHaveLength(1);
      expect(decl[0]?.run ?? decl[0]?.engine, name).toBeDefined();
      expect(decl[0]?.handle, name).toBeUndefined();
    }
  });

  it('meters each declared operation under its dotted id, with its catalogue scope', async () => {
    // A key with no scope at all: every operation answers 403 naming its own id and scope,
    // which shows the router guards each declaration with its catalogue entry.
    const h = await makeHarness({ scopes: [] });
    for (const decl of v1Operations) {
      const url = decl.path.replace(/\{(\w+)\}/g, 'sodium-hydroxide');
      const res = await request(h.app)[decl.method](url).set('Authorization', `Bearer ${h.token}`);
      expect(res.status, decl.operation.id).toBe(403);
      expect(res.body.detail, decl.operation.id).toContain(`"${decl.operation.scope}"`);
      expect(res.body.detail, decl.operation.id).toContain(decl.operation.id);
    }
    const rows = await h.store.rows<{ operation: string }>(
      sql`SELECT operation FROM usage_events ORDER BY id`,
    );
    expect(rows.map((r) => r.operation)).toEqual(v1Operations.map((d) => d.operation.id));
  });

  it('runs a case of each batch operation as that operation would, and names a failing case’s fields under cases[i]', async () => {
    const h = await makeHarness({ quota: 1_000_000 });
    for (const decl of v1Operations) {
      if (!('batchName' in decl.operation)) continue;
      const example = decl.request?.body
        ? (decl.request.example?.value ?? decl.request.body.meta()?.example)
        : { pressure: 101.325 };
      const res = await request(h.app)
        .post('/v1/batch')
        .set('Authorization', `Bearer ${h.token}`)
        .send({ operation: decl.operation.batchName, liquor: 'sodium-hydroxide', cases: [example, {}] });
      expect(res.status, decl.operation.id).toBe(200);
      expect(res.body.results[0].status, `${decl.operation.id} ${JSON.stringify(res.body.results[0])}`).toBe(
        'ok',
      );
      expect(res.body.results[1].status, decl.operation.id).toBe('error');
      const field: string = res.body.results[1].problem.errors[0].field;
      expect(field.startsWith('cases[1].'), `${decl.operation.id}: ${field}`).toBe(true);
      expect(field, decl.operation.id).not.toContain('..');
      expect(res.body.results[1].problem.detail, decl.operation.id).toContain(field);
    }
  });

  it('names a batch warning about a request field under cases[i], and one about a result quantity as it is', async () => {
    const h = await makeHarness({ quota: 1_000_000 });
    const boiling = await request(h.app)
      .post('/v1/batch')
      .set('Authorization', `Bearer ${h.token}`)
      .send({
        operation: 'liquor-boiling-point',
        liquor: 'sodium-hydroxide',
        cases: [
          { massFraction: 0.3, pressure: 20 },
          { massFraction: 0.75, pressure: 20 },
        ],
      });
    // 75 % NaOH lies beyond the model's vapour-pressure data (it warns model-extrapolated).
    expect(boiling.body.results[1].result.warnings[0]).toMatchObject({
      code: 'model-extrapolated',
      field: 'cases[1].massFraction',
    });
    const single = v1Operations.find((d) => d.operation.id === 'evaporators.single-effect')!;
    const evaporator = await request(h.app)
      .post('/v1/batch')
      .set('Authorization', `Bearer ${h.token}`)
      .send({ operation: 'single-effect', cases: [single.request!.example!.value] });
    // The documented concentrator runs a ΔT above 60 K: a warning about a result, not a request field.
    expect(evaporator.body.results[0].result.warnings[0]).toMatchObject({
      code: 'large-temperature-difference',
      field: 'temperatureDifference',
    });
  });
});
