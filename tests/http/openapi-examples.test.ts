// Every worked example in the OpenAPI document works: the request each operation documents (its
// path and query parameter examples and its JSON body example) is sent to the real app and must be
// answered with a 2xx, and the documented answers of the operations that take no input match
// their schemas and add up. So Swagger UI's "Try it out" never starts from a refused request.
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { operationInfo } from '../../server/accounts/operations.js';
import { buildOpenApiDocument } from '../../server/http/openapi.js';
import { usageExample } from '../../server/http/v1/operations/usage.js';
import { v1Operations } from '../../server/http/v1/operations/index.js';
import {
  StoredLiquorListSchema,
  SweepRequestSchema,
  UsageResponseSchema,
} from '../../shared/contracts/index.js';
import { makeHarness } from './helpers.js';

interface Parameter {
  in: 'path' | 'query';
  name: string;
  example?: unknown;
  schema?: { example?: unknown };
}
interface Operation {
  operationId: string;
  parameters?: Parameter[];
  requestBody?: {
    content: Record<string, { example?: unknown; examples?: Record<string, { value: unknown }> }>;
  };
}

// The worked answers of the operations that take no input, by operationId (from their declarations).
const responseExamples = Object.fromEntries(
  v1Operations
    .filter((d) => d.response.example !== undefined)
    .map((d) => [d.openApiName, d.response.example]),
);

const doc = buildOpenApiDocument() as unknown as { paths: Record<string, Record<string, Operation>> };
const documented = Object.entries(doc.paths).flatMap(([path, item]) =>
  Object.entries(item).map(([method, op]) => ({ path, method, op })),
);
// The stored liquor the create example makes is the one the delete example removes.
const order = (id: string) => (id === 'createStoredLiquor' ? 0 : id === 'deleteStoredLiquor' ? 2 : 1);

function exampleOf(p: Parameter): unknown {
  return p.example ?? p.schema?.example;
}

describe('the worked examples of the OpenAPI document', () => {
  it('covers every operation with a documented request or answer', () => {
    for (const { method, path, op } of documented) {
      const hasInput = (op.parameters ?? []).some((p) => exampleOf(p) !== undefined) || op.requestBody;
      const isNoInput = op.operationId in responseExamples;
      expect(hasInput || isNoInput, `${method.toUpperCase()} ${path} has no worked example`).toBeTruthy();
    }
  });

  it('answers each documented request with a 2xx', async () => {
    // A pause between chunks keeps the long job running while its cancel example is sent.
    const h = await makeHarness({ quota: 1_000_000, rateLimit: 100_000, config: { jobChunkPauseMs: 200 } });
    // The job routes' examples need jobs of this account: a finished one, and one still running to cancel.
    const submit = async (steps: number) => {
      const example = (SweepRequestSchema.meta()?.example ?? {}) as Record<string, unknown>;
      const res = await request(h.app)
        .post('/v1/sweeps')
        .set('Authorization', `Bearer ${h.token}`)
        .set('Prefer', 'respond-async')
        .send({ ...example, vary: [{ field: 'feed.temperature', from: 30, to: 80, steps }] });
      expect(res.status, JSON.stringify(res.body)).toBe(202);
      return (res.body as { id: string }).id;
    };
    const finished = await submit(6);
    for (let i = 0; i < 200; i++) {
      const res = await request(h.app).get(`/v1/jobs/${finished}`).set('Authorization', `Bearer ${h.token}`);
      if ((res.body as { state: string }).state === 'succeeded') break;
      await new Promise((r) => setTimeout(r, 50));
    }
    const running = await submit(10_000);
    const jobIdOf = (operationId: string) => (operationId === 'cancelJob' ? running : finished);
    const sorted = [...documented].sort((a, b) => order(a.op.operationId) - order(b.op.operationId));
    for (const { method, path, op } of sorted) {
      let url = path;
      const query: Record<string, string> = {};
      for (const p of op.parameters ?? []) {
        const value = p.name === 'jobId' ? jobIdOf(op.operationId) : exampleOf(p);
        if (value === undefined) continue;
        if (p.in === 'path') url = url.replace(`{${p.name}}`, encodeURIComponent(String(value)));
        else query[p.name] = String(value);
      }
      expect(url, `${op.operationId}: every path parameter has an example`).not.toMatch(/[{}]/);
      const json = op.requestBody?.content['application/json'];
      const body = json?.example ?? Object.values(json?.examples ?? {})[0]?.value;
      const verb = method as 'get' | 'post' | 'delete';
      let call = request(h.app)[verb](url).query(query).set('Authorization', `Bearer ${h.token}`);
      if (body !== undefined) call = call.send(body as object);
      const res = await call;
      expect(
        res.status,
        `${op.operationId}: ${JSON.stringify(res.body).slice(0, 300)}`,
      ).toBeGreaterThanOrEqual(200);
      expect(res.status, `${op.operationId}: ${JSON.stringify(res.body).slice(0, 300)}`).toBeLessThan(300);
    }
  });

  it("answers each request-body schema's own example with a 2xx", async () => {
    // Swagger UI shows the body schema's example too (the multiple-effect one runs a thermocompressor)
    const h = await makeHarness({ quota: 1_000_000, rateLimit: 100_000 });
    const schemas = (doc as unknown as { components: { schemas: Record<string, { example?: unknown }> } })
      .components.schemas;
    let sent = 0;
    for (const { method, path, op } of documented) {
      const ref = (op.requestBody?.content['application/json'] as { schema?: { $ref?: string } } | undefined)
        ?.schema?.$ref;
      const example = ref ? schemas[ref.split('/').pop() as string]?.example : undefined;
      if (example === undefined || /[{}]/.test(path) || method !== 'post') continue;
      const res = await request(h.app)
        .post(path)
        .set('Authorization', `Bearer ${h.token}`)
        .send(example as object);
      expect(
        res.status,
        `${op.operationId}: ${JSON.stringify(res.body).slice(0, 300)}`,
      ).toBeGreaterThanOrEqual(200);
      expect(res.status, `${op.operationId}: ${JSON.stringify(res.body).slice(0, 300)}`).toBeLessThan(300);
      sent++;
    }
    expect(sent).toBeGreaterThan(0);
  });

  it('documents answers that match their schemas', () => {
    expect(StoredLiquorListSchema.safeParse(responseExamples.listStoredLiquors).success).toBe(true);
    expect(UsageResponseSchema.safeParse(responseExamples.getUsage).success).toBe(true);
  });

  it('documents a usage answer whose figures add up with the catalogue’s unit costs', () => {
    expect(responseExamples.getUsage).toBe(usageExample);
    const u = usageExample;
    const sum = (rows: readonly { requests: number; units: number; errors: number }[]) =>
      rows.reduce(
        (t, r) => ({
          requests: t.requests + r.requests,
          units: t.units + r.units,
          errors: t.errors + r.errors,
        }),
        {
          requests: 0,
          units: 0,
          errors: 0,
        },
      );
    expect(sum(u.byOperation)).toEqual(u.totals);
    expect(sum(u.byDay)).toEqual(u.totals);
    expect(u.quota.used).toBe(u.totals.units);
    expect(u.quota.remaining).toBe(u.quota.limit - u.quota.used);
    // Units are charged for requests answered below 400 only.
    for (const row of u.byOperation) {
      const op = operationInfo(row.operation)!;
      const billed = row.requests - row.errors;
      if (row.operation === 'evaporators.multiple-effect') {
        // 5 + unitsPerEffect × effects: the example account runs three-effect trains.
        expect(row.units).toBe(billed * (op.units + ('unitsPerEffect' in op ? op.unitsPerEffect : 0) * 3));
      } else {
        expect(row.units).toBe(billed * op.units);
      }
    }
  });
});
