// Multipart uploads answer alike on /v1/batch and /v1/stored-liquors (server/http/upload.ts):
// a file over the size limit is 413, a file in an unexpected field or a second file is 422
// 'validation-failed' naming the field, and a body that is not readable multipart is 400.
// RFC 9110 §15.5.14 (413 Content Too Large) and §15.5.21 (422 Unprocessable Content); RFC 7578
// (multipart/form-data) for the form the uploads take.
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { MAX_UPLOAD_BYTES } from '../../shared/contracts/liquors.js';
import { makeHarness } from './helpers.js';

// An invented Dühring table (not from any plant or book), the shape /v1/stored-liquors reads.
const CSV = 'massFraction,waterBoilingPoint,solutionBoilingPoint\n0.2,50,51.2\n0.2,100,101.5\n';
const routes = ['/v1/stored-liquors', '/v1/batch'] as const;

describe.each(routes)('uploads to %s', (path) => {
  it('refuses a file in a field other than "file" with 422 naming that field', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post(path)
      .set('Authorization', `Bearer ${h.token}`)
      .field('name', 'Invented liquor')
      .attach('table', Buffer.from(CSV), 'table.csv');
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(res.body).toMatchObject({ type: '/problems/validation-failed', status: 422 });
    expect(res.body.errors).toEqual([expect.objectContaining({ field: 'table' })]);
  });

  it('refuses a second file with 422', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post(path)
      .set('Authorization', `Bearer ${h.token}`)
      .attach('file', Buffer.from(CSV), 'one.csv')
      .attach('file', Buffer.from(CSV), 'two.csv');
    expect(res.status).toBe(422);
    expect(res.body.type).toBe('/problems/validation-failed');
  });

  it('refuses a file over the limit with 413 stating the limit', async () => {
    const h = await makeHarness({ config: { bodyLimitBytes: 4 * MAX_UPLOAD_BYTES } });
    const big = Buffer.alloc(MAX_UPLOAD_BYTES + 1, 'a');
    const res = await request(h.app)
      .post(path)
      .set('Authorization', `Bearer ${h.token}`)
      .attach('file', big, 'big.csv');
    expect(res.status).toBe(413);
    expect(res.body.type).toBe('/problems/payload-too-large');
    expect(res.body.detail).toContain(String(MAX_UPLOAD_BYTES));
  });

  it('answers a multipart body that cannot be read with 400', async () => {
    const h = await makeHarness();
    const res = await request(h.app)
      .post(path)
      .set('Authorization', `Bearer ${h.token}`)
      .set('Content-Type', 'multipart/form-data; boundary=xyz')
      .send(
        '--xyz\r\nContent-Disposition: form-data; name="file"; filename="a.csv"\r\n\r\nno closing boundary',
      );
    expect(res.status).toBe(400);
    expect(res.body.type).toBe('/problems/bad-request');
  });
});
