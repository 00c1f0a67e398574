// A deprecated operation announces its end on every answer (DEVELOPERS.md "How /v1 evolves").
// The sample operation exists only in this test app: the saturation operation again, under its
// own path, declared deprecated.
import request from 'supertest';
import { beforeEach, describe, expect, it } from 'vitest';
import { buildOpenApiDocument } from '../../server/http/openapi.js';
import { deprecationHeaders, mountOperation, type AnyOperation } from '../../server/http/v1/operation.js';
import { steamSaturation } from '../../server/http/v1/operations/steam.js';
import { v1Operations } from '../../server/http/v1/operations/index.js';
import { v1RouteModules } from '../../server/http/v1/index.js';
import type { V1RouteModule } from '../../server/http/v1/module.js';
import { makeHarness, type Harness } from './helpers.js';

const since = new Date('2031-01-01T00:00:00Z'); // 1924992000 s after the Unix epoch
const sunset = new Date('2031-12-31T23:59:59Z');
const link = 'https://docs.ebullio.test/v2/migration';

const oldSaturation: AnyOperation = {
  ...steamSaturation,
  path: '/v1/__test/old-saturation',
  openApiName: 'getOldSaturation',
  deprecation: { since, sunset, link },
};
const sinceOnly: AnyOperation = {
  ...steamSaturation,
  path: '/v1/__test/old-saturation-no-sunset',
  openApiName: 'getOldSaturationNoSunset',
  deprecation: { since, link },
};

const deprecatedModule: V1RouteModule = {
  register(router, deps) {
    mountOperation(router, oldSaturation, deps);
    mountOperation(router, sinceOnly, deps);
  },
};
if (!v1RouteModules.includes(deprecatedModule)) v1RouteModules.push(deprecatedModule);

let h: Harness;
beforeEach(async () => {
  h = await makeHarness();
});

const get = (path: string) => request(h.app).get(path).set('Authorization', `Bearer ${h.token}`);

describe('a deprecated operation', () => {
  it('sends Deprecation as a structured-field date, Sunset as an IMF-fixdate and both links', async () => {
    const res = await get('/v1/__test/old-saturation?pressure=101.325');
    expect(res.status).toBe(200);
    // RFC 9745 §2.1: the value is an sf-date (RFC 9651 §3.3.7): "@" and integer seconds since the epoch.
    expect(res.headers.deprecation).toBe('@1924992000');
    expect(res.headers.deprecation).toMatch(/^@-?\d{1,15}$/);
    // RFC 8594 §3: Sunset = HTTP-date, sent as IMF-fixdate (RFC 9110 §5.6.7).
    expect(res.headers.sunset).toBe('Wed, 31 Dec 2031 23:59:59 GMT');
    expect(res.headers.sunset).toMatch(
      /^(Mon|Tue|Wed|Thu|Fri|Sat|Sun), \d{2} [A-Z][a-z]{2} \d{4} \d{2}:\d{2}:\d{2} GMT$/,
    );
    // RFC 9745 §3: the "deprecation" link relation; RFC 8594 §6: the "sunset" link relation.
    expect(res.headers.link).toBe(
      `<${link}>; rel="deprecation"; type="text/html", <${link}>; rel="sunset"; type="text/html"`,
    );
    // The answer itself is the operation's own.
    expect((res.body as { temperature: number }).temperature).toBeCloseTo(100, 1);
  });

  it('carries the headers on refusals too', async () => {
    const res = await get('/v1/__test/old-saturation?pressure=-5');
    expect(res.status).toBe(422);
    expect(res.headers.deprecation).toBe('@1924992000');
    expect(res.headers.sunset).toBe('Wed, 31 Dec 2031 23:59:59 GMT');
  });

  it('sends no Sunset and no sunset link when no sunset is declared', async () => {
    const res = await get('/v1/__test/old-saturation-no-sunset?pressure=101.325');
    expect(res.status).toBe(200);
    expect(res.headers.deprecation).toBe('@1924992000');
    expect(res.headers.sunset).toBeUndefined();
    expect(res.headers.link).toBe(`<${link}>; rel="deprecation"; type="text/html"`);
  });

  it('truncates a fractional second in the Deprecation date (sf-date is an integer)', () => {
    expect(deprecationHeaders({ since: new Date('2031-01-01T00:00:00.900Z'), link }).Deprecation).toBe(
      '@1924992000',
    );
  });

  it('is marked deprecated in the OpenAPI document with its dates and link', () => {
    const doc = buildOpenApiDocument([...v1Operations, oldSaturation]) as unknown as {
      paths: Record<
        string,
        Record<
          string,
          { deprecated?: boolean; description?: string; responses: Record<string, { headers?: object }> }
        >
      >;
    };
    const op = doc.paths['/v1/__test/old-saturation']!.get!;
    expect(op.deprecated).toBe(true);
    // Every answer, refusals included, as the server sends them.
    for (const status of ['200', '401', '422', '429']) {
      expect(Object.keys(op.responses[status]!.headers ?? {})).toEqual(
        expect.arrayContaining(['Deprecation', 'Sunset', 'Link']),
      );
    }
    expect(op.description).toContain('Deprecated** since 2031-01-01');
    expect(op.description).toContain('stops answering on 2031-12-31');
    expect(op.description).toContain(link);
    // The operation's own description is kept ahead of the note.
    expect(op.description!.startsWith(steamSaturation.description!)).toBe(true);
  });
});

describe('an operation that is not deprecated', () => {
  it('carries no Deprecation, Sunset or deprecation link', async () => {
    const res = await get('/v1/steam/saturation?pressure=101.325');
    expect(res.status).toBe(200);
    expect(res.headers.deprecation).toBeUndefined();
    expect(res.headers.sunset).toBeUndefined();
    expect(res.headers.link ?? '').not.toContain('deprecation');
  });

  it('is not marked deprecated in the published OpenAPI document', () => {
    const doc = buildOpenApiDocument() as unknown as {
      paths: Record<string, Record<string, { deprecated?: boolean }>>;
    };
    for (const methods of Object.values(doc.paths)) {
      for (const op of Object.values(methods)) expect(op.deprecated).toBeUndefined();
    }
  });
});
