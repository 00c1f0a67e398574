// The dev-only outbox: mail received by the local capture server, newest first, searchable by
// recipient. The search ignores ASCII case, as it always did on SQLite (domains are not case
// sensitive, RFC 5321 §2.4, from memory), and it must behave so on every database the store
// runs on.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { defaultMailCapture, sendMail } from '../../server/mail/send.js';
import { makeConsoleHarness, signIn, type ConsoleHarness } from './auth-harness.js';

let h: ConsoleHarness;
let get: (path: string) => request.Test;
beforeAll(async () => {
  h = await makeConsoleHarness();
  for (const to of ['plant.manager@saltworks.invalid', 'finance@brinery.invalid']) {
    const sent = await sendMail(h.deps, { kind: 'quota-80', to, subject: `Quota for ${to}`, text: 't' });
    expect(sent.status).toBe('sent');
  }
  const s = await signIn(h, 'admin@ebullio.invalid');
  get = (path) => request(h.app).get(`/console-api${path}`).set('Cookie', s.jar.header());
});
afterAll(async () => {
  await (await defaultMailCapture(h.deps)).close();
});

describe('outbox', () => {
  it('lists captured mail newest first with the total', async () => {
    const res = await get('/outbox').expect(200);
    expect(res.body.total).toBe(2);
    expect(res.body.items.map((m: { to: string[] }) => m.to)).toEqual([
      ['finance@brinery.invalid'],
      ['plant.manager@saltworks.invalid'],
    ]);
  });

  it('finds mail by part of a recipient whatever the letter case, and nothing for an unknown one', async () => {
    const found = await get('/outbox?to=PLANT.Manager@SaltWorks').expect(200);
    expect(found.body.total).toBe(1);
    expect(found.body.items[0].subject).toBe('Quota for plant.manager@saltworks.invalid');
    const none = await get('/outbox?to=nobody@nowhere').expect(200);
    expect(none.body).toMatchObject({ total: 0, items: [] });
  });

  it('shows one message with its text', async () => {
    const list = await get('/outbox').expect(200);
    const detail = await get(`/outbox/${list.body.items[0].id}`).expect(200);
    expect(detail.body).toMatchObject({ to: ['finance@brinery.invalid'], text: 't' });
    await get('/outbox/999999').expect(404);
  });
});
