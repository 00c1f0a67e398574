// Client errors raised inside Express and its body parsers (not by our handlers) must still be
// RFC 9457 problems with a 4xx status, never a 500: a malformed percent-encoding in the path, a
// compressed body that does not decompress. Each is metered as an error with 0 units.
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { makeHarness, usageRows } from './helpers.js';

// RFC 3986 §2.1: a percent-encoded octet is "%" followed by two hex digits, so the path segment
// "%E0%A4%A" (a trailing "%A") is not well-formed, and %E0%A4 alone is not complete UTF-8
// (RFC 3629 §3: E0 starts a three-byte sequence). RFC 9110 §15.5.1: 400 is the answer to a
// request the server cannot process because of a client error such as malformed syntax.
const BAD_SEGMENT = '%E0%A4%A';

describe('client errors raised by Express itself', () => {
  it('answers a malformed percent-encoding in a /v1 path with a 400 bad-request problem and meters it with 0 units', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .get(`/v1/liquors/${BAD_SEGMENT}`)
      .set('Authorization', `Bearer ${h.token}`);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body).toMatchObject({ type: '/problems/bad-request', status: 400 });
    expect(res.body.detail).toContain('decode');
    const rows = await usageRows(h.store);
    expect(rows.map((r) => [r.status, r.units])).toEqual([[400, 0]]);
  });

  it('answers a malformed percent-encoding outside /v1 with a 400 problem as well', async () => {
    const h = await makeHarness();
    const res = await request(h.app).get(`/problems/${BAD_SEGMENT}`);
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body.type).toBe('/problems/bad-request');
  });

  it('answers a body labelled gzip that is not gzip data with a 400 problem, not a 500', async () => {
    // RFC 1952 §2.3.1 (from memory): a gzip member starts with the bytes 1f 8b; this body does not.
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'gzip')
      .send('{"pressure": 100}');
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body.type).toBe('/problems/bad-request');
    expect((await usageRows(h.store)).map((r) => r.status)).toEqual([400]);
  });

  it('still answers an unsupported content encoding with the 415 problem', async () => {
    // RFC 9110 §15.5.16 (from memory): 415 covers a Content-Encoding the server does not accept.
    const h = await makeHarness();
    const res = await request(h.app)
      .post('/v1/steam/state')
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'application/json')
      .set('Content-Encoding', 'x-invented-packing')
      .send('{"pressure": 100}');
    expect(res.status).toBe(415);
    expect(res.body.type).toBe('/problems/unsupported-media-type');
  });
});
