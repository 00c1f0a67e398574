// HTTP core behaviour checked against the HTTP standards it implements: RFC 9457 (problem details),
// RFC 9110 (status codes 400/404/413/415), RFC 9562 (UUID version 4 layout).
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { makeHarness } from './helpers.js';

// RFC 9562 §5.4: version nibble 4, variant bits 10xx (hex 8, 9, a or b).
const UUID_V4 = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

describe('request ids', () => {
  it('echoes a well-formed X-Request-Id from the client', async () => {
    const { app } = await makeHarness();
    const res = await request(app).get('/healthz').set('X-Request-Id', 'client-42.a_b');
    expect(res.headers['x-request-id']).toBe('client-42.a_b');
  });

  it('generates a UUID v4 when the client sends none or a malformed one', async () => {
    const { app } = await makeHarness();
    const none = await request(app).get('/healthz');
    expect(none.headers['x-request-id']).toMatch(UUID_V4); // RFC 9562 §5.4 layout
    const bad = await request(app).get('/healthz').set('X-Request-Id', 'has spaces and <html>');
    expect(bad.headers['x-request-id']).toMatch(UUID_V4);
    const long = await request(app).get('/healthz').set('X-Request-Id', 'a'.repeat(129));
    expect(long.headers['x-request-id']).toMatch(UUID_V4);
  });
});

describe('problem details', () => {
  it('answers an unknown route with a 404 application/problem+json carrying type, title, status, instance and requestId', async () => {
    const { app } = await makeHarness();
    const res = await request(app).get('/nowhere/at-all?x=1').set('X-Request-Id', 'r-404');
    expect(res.status).toBe(404);
    // RFC 9457 §3: media type application/problem+json; members type, title, status, detail, instance.
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body).toMatchObject({
      type: '/problems/not-found',
      title: 'Not found',
      status: 404,
      instance: '/nowhere/at-all',
      requestId: 'r-404',
    });
    expect(typeof res.body.detail).toBe('string');
  });

  it('serves a human page and a JSON description for each problem type URI', async () => {
    const { app } = await makeHarness();
    const html = await request(app).get('/problems/quota-exceeded').set('Accept', 'text/html');
    expect(html.status).toBe(200);
    expect(html.headers['content-type']).toMatch(/^text\/html/);
    expect(html.text).toContain('Monthly quota exceeded');
    const json = await request(app).get('/problems/rate-limited').set('Accept', 'application/json');
    expect(json.body).toMatchObject({ type: '/problems/rate-limited', status: 429 });
    const missing = await request(app).get('/problems/no-such-thing');
    expect(missing.status).toBe(404);
  });
});

describe('request bodies', () => {
  it('refuses malformed JSON with 400 malformed-json', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/json')
      .send('{"feed": ');
    expect(res.status).toBe(400); // RFC 9110 §15.5.1
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body.type).toBe('/problems/malformed-json');
  });

  it('refuses a body larger than the limit with 413 payload-too-large', async () => {
    const h = await makeHarness({ config: { bodyLimitBytes: 2048 } });
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ pad: 'x'.repeat(5000) }));
    expect(res.status).toBe(413); // RFC 9110 §15.5.14 Content Too Large
    expect(res.body.type).toBe('/problems/payload-too-large');
  });

  it('refuses a non-JSON content type with 415 unsupported-media-type', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/xml')
      .send('<feed/>');
    expect(res.status).toBe(415); // RFC 9110 §15.5.16
    expect(res.body.type).toBe('/problems/unsupported-media-type');
  });

  // RFC 9110 §8.3.1: media type names are case-insensitive and may carry parameters; RFC 6839 §3.1:
  // a "+json" structured-syntax suffix is JSON.
  it.each([
    ['Application/JSON', '{"a":1}', { a: 1 }],
    ['application/json; charset=utf-8', '{"a":2}', { a: 2 }],
    ['application/vnd.ebullio.case+json', '{"a":3}', { a: 3 }],
    ['text/csv; charset=utf-8', 'x,y\n1,2\n', 'x,y\n1,2\n'],
  ])('reads a body sent as %s', async (type, body, echo) => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', type)
      .send(body);
    expect(res.status).toBe(200);
    expect(res.body.echo).toEqual(echo);
  });

  it('asks no media type of a POST without a body', async () => {
    const h = await makeHarness();
    const res = await request(h.app).post('/v1/__test/charge').set('Authorization', `Bearer ${h.token}`);
    expect(res.status).toBe(200);
  });

  it('accepts a JSON body and passes it to the route', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/__test/charge')
      .set('Authorization', `Bearer ${h.token}`)
      .send({ feed: { massFraction: 0.1 } });
    expect(res.status).toBe(200);
    expect(res.body.echo).toEqual({ feed: { massFraction: 0.1 } });
  });
});

describe('health', () => {
  it('reports the process up on /healthz', async () => {
    const { app } = await makeHarness();
    const res = await request(app).get('/healthz');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok' });
  });

  it('reports ready on /readyz when every migration is applied, and 503 when the database is closed', async () => {
    const h = await makeHarness();
    expect((await request(h.app).get('/readyz')).status).toBe(200);
    await h.store.close();
    const res = await request(h.app).get('/readyz');
    expect(res.status).toBe(503);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  });

  it('reports 503 on /readyz when a migration has not been applied', async () => {
    const h = await makeHarness();
    // Drizzle keeps its journal in __drizzle_migrations (PostgreSQL: in the drizzle schema).
    await h.store.execute(
      h.store.dialect === 'postgres'
        ? sql`DELETE FROM drizzle.__drizzle_migrations`
        : sql`DELETE FROM __drizzle_migrations`,
    );
    const res = await request(h.app).get('/readyz');
    expect(res.status).toBe(503);
    expect(res.body.detail).toMatch(/migration/);
  });
});
