// The key middleware on a store without a SQLite connection: the path PostgreSQL takes (the key
// looked up through the store's raw SQL and awaited, the key checked again after the body with
// an awaited re-check, multipart bodies included). Run here on SQLite with the connection hidden
// from the store, so the whole app can serve the requests; tests/db/identity-postgres.test.ts runs
// the same lookup on PostgreSQL itself.
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { revokeKey } from '../../server/accounts/keys.js';
import { createApp } from '../../server/app.js';
import type { Store } from '../../server/db/store.js';
import { makeHarness } from './helpers.js';

async function portableApp() {
  const h = await makeHarness();
  const store: Store = { ...h.store, sqlite: undefined };
  const app = createApp({ ...h.deps, store });
  return { ...h, app, portableStore: store };
}

const CSV = 'massFraction,waterBoilingPoint,solutionBoilingPoint\n0.1,50,51\n0.2,50,52\n';

describe('key authentication through the portable store path', () => {
  it('serves a valid key and refuses a malformed, an unknown and a missing one with 401', async () => {
    const h = await portableApp();
    const ok = await request(h.app).get('/v1/usage').set('Authorization', `Bearer ${h.token}`);
    expect(ok.status).toBe(200);
    const malformed = await request(h.app).get('/v1/usage').set('Authorization', 'Bearer short');
    expect(malformed.status).toBe(401);
    expect(malformed.body.detail).toMatch(/not "Bearer <key>"/);
    const unknown = await request(h.app)
      .get('/v1/usage')
      .set('Authorization', `Bearer ebk1.AAAAAAAAAAAA.${'B'.repeat(32)}`);
    expect(unknown.status).toBe(401);
    expect(unknown.body.detail).toMatch(/not recognised/);
    expect(unknown.headers['www-authenticate']).toMatch(/^Bearer /);
    expect((await request(h.app).get('/v1/usage')).status).toBe(401);
  });

  it('refuses a key revoked after it was remembered on the very next request', async () => {
    const h = await portableApp();
    const auth = { Authorization: `Bearer ${h.token}` };
    expect((await request(h.app).get('/v1/usage').set(auth)).status).toBe(200);
    await revokeKey(h.portableStore, h.keyId, new Date(h.clock.now.getTime() - 1000));
    const refused = await request(h.app).get('/v1/usage').set(auth);
    expect(refused.status).toBe(401);
    expect(refused.body.detail).toBe('The API key has been revoked.');
  });

  it('checks the key again after a JSON body and after a multipart body, and lets the route answer', async () => {
    const h = await portableApp();
    const auth = { Authorization: `Bearer ${h.token}` };
    const json = await request(h.app)
      .post('/v1/steam/state')
      .set(auth)
      .send({ pressure: '100 kPa', temperature: 20 });
    expect(json.status).toBe(200);
    const upload = await request(h.app)
      .post('/v1/stored-liquors')
      .set(auth)
      .field('name', 'Invented portable syrup')
      .field('id', 'invented-portable-syrup')
      .attach('file', Buffer.from(CSV), { filename: 'd.csv', contentType: 'text/csv' });
    // Past the awaited re-check, the route reads the fields: the missing heat capacity is its own
    // refusal (422 naming the field), not the key's.
    expect(upload.status).toBe(422);
    expect(upload.body.type).toBe('/problems/validation-failed');
    expect(JSON.stringify(upload.body.errors)).toContain('heatCapacity');
  });
});
