// Invitations, password resets (single-use, expiring, delivered by SMTP to the capture server
// and read back through /outbox), user administration and the audit log.
// Sources: OWASP Forgot Password cheat sheet (single-use, time-limited tokens, same answer for
// known and unknown addresses, sessions ended after a reset); OWASP Session Management cheat
// sheet (server-side invalidation); the brief's lifetimes (invitation 72 h, reset 1 h).
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import type { ConsoleHarness } from './auth-harness.js';
import { Jar, PASSWORD, csrf, makeConsoleHarness, signIn } from './auth-harness.js';

async function waitForMail(h: ConsoleHarness, to: string): Promise<{ id: number; text: string }> {
  for (let i = 0; i < 100; i++) {
    const [row] = await h.store.rows<{ id: number; text: string }>(
      // to_addresses is JSON (PostgreSQL's json has no LIKE): compared as its text on both databases.
      sql`SELECT id, text_body AS text FROM captured_mail WHERE CAST(to_addresses AS TEXT) LIKE ${`%${to}%`} ORDER BY id DESC`,
    );
    if (row) return row;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`no mail to ${to} arrived`);
}

function tokenFrom(text: string, page: string): string {
  const m = new RegExp(`/console/${page}\\?token=([A-Za-z0-9_-]+)`).exec(text);
  if (!m?.[1]) throw new Error(`no ${page} link in: ${text}`);
  return m[1];
}

async function admin(h: ConsoleHarness) {
  const s = await signIn(h, 'admin@ebullio.invalid');
  const send = (method: 'post' | 'patch', path: string, body: object) => {
    const agent = request(h.app);
    const req = method === 'post' ? agent.post(`/console-api${path}`) : agent.patch(`/console-api${path}`);
    return req.set('Cookie', s.jar.header()).set('X-CSRF-Token', s.token).send(body);
  };
  const get = (path: string) => request(h.app).get(`/console-api${path}`).set('Cookie', s.jar.header());
  return { ...s, send, get };
}

describe('invitations', () => {
  it('mails a single-use link over SMTP that creates the user with role and memberships', async () => {
    const h = await makeConsoleHarness();
    const a = await admin(h);
    const inv = await a.send('post', '/users/invitations', {
      email: 'New.Engineer@Ebullio.invalid',
      role: 'developer',
      accountIds: [h.otherAccountId],
    });
    expect(inv.status).toBe(201);
    expect(inv.body.mailStatus).toBe('sent');
    // The message went through the capture server and is readable in the outbox (brief).
    const outbox = await a.get('/outbox');
    expect(outbox.status).toBe(200);
    expect(outbox.body.items[0].to).toEqual(['new.engineer@ebullio.invalid']);
    const detail = await a.get(`/outbox/${outbox.body.items[0].id}`);
    const token = tokenFrom(detail.body.text, 'accept-invitation');
    // Only a hash is stored (brief: user_tokens row, hash only).
    const [stored] = await h.store.rows<{ token_hash: string }>(sql`SELECT token_hash FROM user_tokens`);
    expect(stored!.token_hash).not.toContain(token);

    const info = await request(h.app).get(`/console-api/auth/invitations/${token}`);
    expect(info.body).toMatchObject({ email: 'new.engineer@ebullio.invalid', role: 'developer' });

    const jar = new Jar();
    const t = await csrf(h, jar);
    const accept = jar.take(
      await request(h.app)
        .post('/console-api/auth/invitations/accept')
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', t)
        .send({ token, name: 'Ines Varga', password: 'a long new password' }),
    );
    expect(accept.status).toBe(201);
    expect(accept.body.user).toMatchObject({
      name: 'Ines Varga',
      role: 'developer',
      accountIds: [h.otherAccountId],
    });
    expect((await request(h.app).get('/console-api/auth/me').set('Cookie', jar.header())).status).toBe(200);

    // Accepting signed the new user in, and the CSRF cookie now holds a token bound to that session.
    const bound = jar.cookies.get('ebullio_csrf');
    expect(bound).not.toBe(t);
    // OWASP Forgot Password cheat sheet: tokens are single use.
    const again = await request(h.app)
      .post('/console-api/auth/invitations/accept')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', bound!)
      .send({ token, name: 'Someone Else', password: 'another long password' });
    expect(again.status).toBe(422);
    expect(again.body.errors[0].field).toBe('token');
    expect((await request(h.app).get(`/console-api/auth/invitations/${token}`)).status).toBe(404);
  });

  it('refuses an invitation after 72 hours', async () => {
    const h = await makeConsoleHarness();
    const a = await admin(h);
    await a.send('post', '/users/invitations', {
      email: 'late@ebullio.invalid',
      role: 'billing',
      accountIds: [],
    });
    const token = tokenFrom((await waitForMail(h, 'late@ebullio.invalid')).text, 'accept-invitation');
    h.clock.now = new Date(h.clock.now.getTime() + 72 * 3_600_000 + 1000);
    expect((await request(h.app).get(`/console-api/auth/invitations/${token}`)).status).toBe(404);
  });

  it('withdraws a pending invitation: its link stops working, it leaves the list, and it is audited', async () => {
    const h = await makeConsoleHarness();
    const a = await admin(h);
    const inv = await a.send('post', '/users/invitations', {
      email: 'changed-mind@ebullio.invalid',
      role: 'developer',
      accountIds: [],
    });
    const token = tokenFrom((await waitForMail(h, 'changed-mind@ebullio.invalid')).text, 'accept-invitation');
    expect((await request(h.app).get(`/console-api/auth/invitations/${token}`)).status).toBe(200);

    const withdrawn = await a.send('post', `/users/invitations/${inv.body.invitation.id}/withdraw`, {});
    expect(withdrawn.status).toBe(200);
    expect(withdrawn.body).toMatchObject({
      id: inv.body.invitation.id,
      email: 'changed-mind@ebullio.invalid',
    });
    // The link is dead at once, for reading and for accepting.
    expect((await request(h.app).get(`/console-api/auth/invitations/${token}`)).status).toBe(404);
    const jar = new Jar();
    const t = await csrf(h, jar);
    const accept = await request(h.app)
      .post('/console-api/auth/invitations/accept')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', t)
      .send({ token, name: 'Too Late', password: 'a long new password' });
    expect(accept.status).toBe(422);
    expect((await a.get('/users')).body.invitations).toEqual([]);
    const audit = await h.store.rows<{ targetId: string }>(
      sql`SELECT target_id AS "targetId" FROM audit_log WHERE action = 'user.invitation.withdraw'`,
    );
    expect(audit).toEqual([{ targetId: String(inv.body.invitation.id) }]);
    // Withdrawing twice, or something that is not a pending invitation, is a 404.
    expect((await a.send('post', `/users/invitations/${inv.body.invitation.id}/withdraw`, {})).status).toBe(
      404,
    );
    expect((await a.send('post', '/users/invitations/99999/withdraw', {})).status).toBe(404);
  });

  it('refuses to invite an existing user or into an account that does not exist', async () => {
    const h = await makeConsoleHarness();
    const a = await admin(h);
    const dup = await a.send('post', '/users/invitations', {
      email: 'billing@ebullio.invalid',
      role: 'billing',
    });
    expect(dup.status).toBe(409);
    const bad = await a.send('post', '/users/invitations', {
      email: 'x@ebullio.invalid',
      role: 'developer',
      accountIds: [999],
    });
    expect(bad.status).toBe(422);
    expect(bad.body.errors[0]).toMatchObject({ field: 'accountIds[0]', value: 999 });
  });
});

describe('password reset', () => {
  it('answers 202 alike for known and unknown addresses and mails only the known one', async () => {
    const h = await makeConsoleHarness();
    const jar = new Jar();
    const t = await csrf(h, jar);
    const ask = (email: string) =>
      request(h.app)
        .post('/console-api/auth/password-reset/request')
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', t)
        .send({ email });
    const unknown = await ask('nobody@ebullio.invalid');
    const known = await ask('billing@ebullio.invalid');
    // OWASP Forgot Password cheat sheet: a consistent message for existent and non-existent accounts.
    expect(unknown.status).toBe(202);
    expect(known.status).toBe(202);
    expect(unknown.body).toEqual(known.body);
    await waitForMail(h, 'billing@ebullio.invalid');
    const [toUnknown] = await h.store.rows<{ n: number | string }>(
      sql`SELECT COUNT(*) AS n FROM captured_mail WHERE CAST(to_addresses AS TEXT) LIKE '%nobody%'`,
    );
    expect(Number(toUnknown!.n)).toBe(0);
  });

  it('sets the new password once, ends every session, and refuses the token a second time', async () => {
    const h = await makeConsoleHarness();
    const session = await signIn(h, 'developer@ebullio.invalid');
    const jar = new Jar();
    const t = await csrf(h, jar);
    const post = (path: string, body: object) =>
      request(h.app)
        .post(`/console-api/auth/${path}`)
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', t)
        .send(body);
    await post('password-reset/request', { email: 'developer@ebullio.invalid' });
    const token = tokenFrom((await waitForMail(h, 'developer@ebullio.invalid')).text, 'reset-password');
    expect((await post('password-reset/confirm', { token, password: 'short' })).status).toBe(422);
    expect((await post('password-reset/confirm', { token, password: 'a brand new passphrase' })).status).toBe(
      200,
    );
    // OWASP Forgot Password cheat sheet: invalidate existing sessions after a reset.
    expect(
      (await request(h.app).get('/console-api/auth/me').set('Cookie', session.jar.header())).status,
    ).toBe(401);
    expect((await post('password-reset/confirm', { token, password: 'yet another passphrase' })).status).toBe(
      422,
    );
    expect((await signIn(h, 'developer@ebullio.invalid', PASSWORD)).res.status).toBe(401);
    expect((await signIn(h, 'developer@ebullio.invalid', 'a brand new passphrase')).res.status).toBe(200);
  });

  it('refuses a reset token after one hour', async () => {
    const h = await makeConsoleHarness();
    const jar = new Jar();
    const t = await csrf(h, jar);
    await request(h.app)
      .post('/console-api/auth/password-reset/request')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', t)
      .send({ email: 'admin@ebullio.invalid' });
    const token = tokenFrom((await waitForMail(h, 'admin@ebullio.invalid')).text, 'reset-password');
    h.clock.now = new Date(h.clock.now.getTime() + 3_600_000 + 1000);
    const res = await request(h.app)
      .post('/console-api/auth/password-reset/confirm')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', t)
      .send({ token, password: 'a brand new passphrase' });
    expect(res.status).toBe(422);
  });
});

describe('user administration', () => {
  it('deactivating a user revokes their sessions at once and is audited', async () => {
    const h = await makeConsoleHarness();
    const a = await admin(h);
    const dev = await signIn(h, 'developer@ebullio.invalid');
    const res = await a.send('patch', `/users/${h.users.developer.id}`, { active: false });
    expect(res.status).toBe(200);
    expect(res.body.active).toBe(false);
    expect((await request(h.app).get('/console-api/auth/me').set('Cookie', dev.jar.header())).status).toBe(
      401,
    );
    expect((await signIn(h, 'developer@ebullio.invalid')).res.status).toBe(401);
    const audit = await a.get('/audit?action=user.deactivate');
    expect(audit.body.total).toBe(1);
    expect(audit.body.items[0]).toMatchObject({
      actorEmail: 'admin@ebullio.invalid',
      targetId: String(h.users.developer.id),
    });
  });

  it('changes role and memberships, and keeps at least one active admin', async () => {
    const h = await makeConsoleHarness();
    const a = await admin(h);
    const res = await a.send('patch', `/users/${h.users.billing.id}`, {
      role: 'developer',
      accountIds: [h.otherAccountId],
    });
    expect(res.body).toMatchObject({ role: 'developer', accountIds: [h.otherAccountId] });
    const self = await a.send('patch', `/users/${h.users.admin.id}`, { role: 'billing' });
    expect(self.status).toBe(409);
    const list = await a.get('/users');
    expect(list.body.items.map((u: { role: string }) => u.role)).toEqual(['admin', 'developer', 'developer']);
  });
});
