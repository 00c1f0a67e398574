// Console sign-in, session cookies, expiry, refresh rotation, sign-out and CSRF.
// Sources named beside each check: RFC 6265 (cookies: HttpOnly, Secure, Path), RFC 6265bis draft
// (SameSite), RFC 7519 §4.1.4 (exp), RFC 9700 §4.14.2 (refresh-token rotation, reuse revokes),
// OWASP Session Management, Authentication and CSRF Prevention cheat sheets.
import { sql } from 'drizzle-orm';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { decodeJwt, decodeProtectedHeader } from 'jose';
import { CSRF_COOKIE } from '../../shared/console/common.js';
import { Jar, PASSWORD, csrf, makeConsoleHarness, setCookies, signIn } from './auth-harness.js';

describe('console sign-in', () => {
  it('sets an httpOnly SameSite=Strict access cookie and a refresh cookie scoped to /console-api/auth', async () => {
    const h = await makeConsoleHarness();
    const { res } = await signIn(h, 'admin@ebullio.invalid');
    expect(res.status).toBe(200);
    const cookies = setCookies(res);
    const access = cookies.get('ebullio_access');
    const refresh = cookies.get('ebullio_refresh');
    // RFC 6265 §4.1.2.6: HttpOnly keeps the cookie from scripts (OWASP Session Management cheat sheet).
    expect(access?.attrs).toContain('HttpOnly');
    expect(refresh?.attrs).toContain('HttpOnly');
    // RFC 6265bis §4.1.2.7: SameSite=Strict withholds the cookie on cross-site requests.
    expect(access?.attrs).toContain('SameSite=Strict');
    expect(refresh?.attrs).toContain('SameSite=Strict');
    // RFC 6265 §4.1.2.4: Path limits where the browser sends the refresh token.
    expect(refresh?.attrs).toContain('Path=/console-api/auth');
    // Plain HTTP without a trusted proxy: no Secure flag (a browser would drop it over http).
    expect(access?.attrs).not.toContain('Secure');
    // The brief: HS256 access JWT with claims sub, sid, role, ~15 min (RFC 7519 §4.1.4 exp, §4.1.6 iat).
    expect(decodeProtectedHeader(access!.value).alg).toBe('HS256');
    const claims = decodeJwt(access!.value);
    expect(claims.sub).toBe(String(h.users.admin.id));
    expect(claims.role).toBe('admin');
    expect(typeof claims.sid).toBe('string');
    expect((claims.exp ?? 0) - (claims.iat ?? 0)).toBe(900);
  });

  it('marks the cookies Secure when a trusted proxy says the request came over HTTPS', async () => {
    const h = await makeConsoleHarness({ trustProxy: true });
    const jar = new Jar();
    const token = await csrf(h, jar);
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('X-Forwarded-Proto', 'https')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', token)
      .send({ email: 'admin@ebullio.invalid', password: PASSWORD });
    expect(res.status).toBe(200);
    // RFC 6265 §4.1.2.5 Secure; Express req.secure honours X-Forwarded-Proto only with "trust proxy" (Express docs).
    expect(setCookies(res).get('ebullio_access')?.attrs).toContain('Secure');
    expect(setCookies(res).get('ebullio_refresh')?.attrs).toContain('Secure');
  });

  it('ignores X-Forwarded-Proto when no proxy is trusted', async () => {
    const h = await makeConsoleHarness();
    const jar = new Jar();
    const token = await csrf(h, jar);
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('X-Forwarded-Proto', 'https')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', token)
      .send({ email: 'admin@ebullio.invalid', password: PASSWORD });
    // Express docs ("behind proxies"): without trust proxy, the header is the client's claim, not believed.
    expect(setCookies(res).get('ebullio_access')?.attrs).not.toContain('Secure');
  });

  it('gives the same answer for an unknown e-mail and a wrong password', async () => {
    const h = await makeConsoleHarness();
    const unknown = await signIn(h, 'nobody@ebullio.invalid', 'whatever-password');
    const wrong = await signIn(h, 'admin@ebullio.invalid', 'wrong-password-here');
    // OWASP Authentication cheat sheet ("Authentication and error messages"): one generic response.
    expect(unknown.res.status).toBe(401);
    expect(wrong.res.status).toBe(401);
    expect(unknown.res.body.detail).toBe(wrong.res.body.detail);
    expect(unknown.res.body.type).toBe(wrong.res.body.type);
    expect(setCookies(wrong.res).has('ebullio_access')).toBe(false);
    // Security events are audited (brief).
    const actions = await h.store.rows(
      sql`SELECT action FROM audit_log WHERE action LIKE 'auth.%' ORDER BY id`,
    );
    expect(actions).toEqual([{ action: 'auth.sign-in-failed' }, { action: 'auth.sign-in-failed' }]);
  });

  it('refuses the access cookie once it has expired and accepts a refreshed one', async () => {
    const h = await makeConsoleHarness();
    const { jar, token } = await signIn(h, 'developer@ebullio.invalid');
    expect((await request(h.app).get('/console-api/auth/me').set('Cookie', jar.header())).status).toBe(200);
    h.clock.now = new Date(h.clock.now.getTime() + 16 * 60_000);
    // RFC 7519 §4.1.4: the token must not be accepted on or after exp.
    const expired = await request(h.app).get('/console-api/auth/me').set('Cookie', jar.header());
    expect(expired.status).toBe(401);
    const refreshed = jar.take(
      await request(h.app)
        .post('/console-api/auth/refresh')
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', token),
    );
    expect(refreshed.status).toBe(200);
    const me = await request(h.app).get('/console-api/auth/me').set('Cookie', jar.header());
    expect(me.status).toBe(200);
    expect(me.body.user.email).toBe('developer@ebullio.invalid');
  });

  it('refuses a refresh after the session lifetime', async () => {
    const h = await makeConsoleHarness({ consoleSessionHours: 8 });
    const { jar, token } = await signIn(h, 'admin@ebullio.invalid');
    h.clock.now = new Date(h.clock.now.getTime() + 8 * 3_600_000 + 1000);
    const res = await request(h.app)
      .post('/console-api/auth/refresh')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', token);
    // Brief: refresh token lifetime ~8 h–7 d; after it the user signs in again.
    expect(res.status).toBe(401);
  });

  it('rotates the refresh token and revokes the session when an old one is replayed', async () => {
    const h = await makeConsoleHarness();
    const { jar, token } = await signIn(h, 'admin@ebullio.invalid');
    const first = jar.cookies.get('ebullio_refresh')!;
    jar.take(
      await request(h.app)
        .post('/console-api/auth/refresh')
        .set('Cookie', jar.header())
        .set('X-CSRF-Token', token),
    );
    const second = jar.cookies.get('ebullio_refresh')!;
    expect(second).not.toBe(first); // RFC 9700 §4.14.2: a new refresh token at every use.
    // Replay the first token (a thief's copy).
    const replay = await request(h.app)
      .post('/console-api/auth/refresh')
      .set(
        'Cookie',
        `ebullio_refresh=${encodeURIComponent(first)}; ebullio_csrf=${encodeURIComponent(jar.cookies.get('ebullio_csrf')!)}`,
      )
      .set('X-CSRF-Token', token);
    expect(replay.status).toBe(401);
    // RFC 9700 §4.14.2: reuse of an invalidated refresh token revokes the active one too.
    const legit = await request(h.app)
      .post('/console-api/auth/refresh')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', token);
    expect(legit.status).toBe(401);
    // And the access JWT of that session stops working at once (sid checked on every request).
    expect((await request(h.app).get('/console-api/auth/me').set('Cookie', jar.header())).status).toBe(401);
    const audit = await h.store.rows(
      sql`SELECT actor_email FROM audit_log WHERE action = 'auth.refresh-replay'`,
    );
    expect(audit).toEqual([{ actor_email: 'admin@ebullio.invalid' }]);
  });

  it('signs out by revoking the session, so the old access cookie is refused immediately', async () => {
    const h = await makeConsoleHarness();
    const { jar, token } = await signIn(h, 'billing@ebullio.invalid');
    const stolen = jar.header();
    const out = await request(h.app)
      .post('/console-api/auth/sign-out')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', token);
    expect(out.status).toBe(200);
    // OWASP Session Management cheat sheet: logout invalidates the session on the server side.
    expect((await request(h.app).get('/console-api/auth/me').set('Cookie', stolen)).status).toBe(401);
    const refresh = await request(h.app)
      .post('/console-api/auth/refresh')
      .set('Cookie', stolen)
      .set('X-CSRF-Token', token);
    expect(refresh.status).toBe(401);
  });
});

describe('console CSRF protection', () => {
  it('refuses a token minted for another session with 403 csrf-failed and accepts the session’s own', async () => {
    // OWASP CSRF Prevention cheat sheet ("Signed Double-Submit Cookie"): the token is bound to
    // the session, so a validly signed token obtained by another client does not work here.
    const h = await makeConsoleHarness();
    const other = await signIn(h, 'developer@ebullio.invalid');
    const admin = await signIn(h, 'admin@ebullio.invalid');
    expect(other.token).not.toBe(admin.token);
    const refresh = (jar: Jar, token: string) =>
      request(h.app).post('/console-api/auth/refresh').set('Cookie', jar.header()).set('X-CSRF-Token', token);

    const planted = new Jar();
    for (const [name, value] of admin.jar.cookies) planted.cookies.set(name, value);
    planted.cookies.set(CSRF_COOKIE, other.token);
    const refused = await refresh(planted, other.token);
    expect(refused.status).toBe(403);
    expect(refused.body.type).toBe('/problems/csrf-failed');

    expect(admin.jar.cookies.get(CSRF_COOKIE)).toBe(admin.token);
    expect((await refresh(admin.jar, admin.token)).status).toBe(200);
  });

  it('issues a token bound to the new session on sign-in; the one minted before sign-in stops working', async () => {
    const h = await makeConsoleHarness();
    const jar = new Jar();
    const before = await csrf(h, jar);
    const { token: after } = await signIn(h, 'billing@ebullio.invalid', PASSWORD, jar);
    expect(after).not.toBe(before);
    // The console reads the cookie before each call, so the new token reaches it by itself.
    expect(jar.cookies.get(CSRF_COOKIE)).toBe(after);
    // GET /auth/csrf keeps answering the bound token for this session.
    expect(await csrf(h, jar)).toBe(after);

    const stale = new Jar();
    for (const [name, value] of jar.cookies) stale.cookies.set(name, value);
    stale.cookies.set(CSRF_COOKIE, before);
    const refused = await request(h.app)
      .post('/console-api/auth/sign-out')
      .set('Cookie', stale.header())
      .set('X-CSRF-Token', before);
    expect(refused.status).toBe(403);
    expect(refused.body.type).toBe('/problems/csrf-failed');
    const out = await request(h.app)
      .post('/console-api/auth/sign-out')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', after);
    expect(out.status).toBe(200);
  });

  it('refuses a state-changing request without the X-CSRF-Token header', async () => {
    const h = await makeConsoleHarness();
    const jar = new Jar();
    await csrf(h, jar);
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('Cookie', jar.header())
      .send({ email: 'admin@ebullio.invalid', password: PASSWORD });
    // OWASP CSRF Prevention cheat sheet, double-submit cookie: the header must accompany the cookie.
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/csrf-failed');
  });

  it('refuses a header that does not match the cookie', async () => {
    const h = await makeConsoleHarness();
    const jar = new Jar();
    await csrf(h, jar);
    const other = await csrf(h, new Jar());
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', other)
      .send({ email: 'admin@ebullio.invalid', password: PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/csrf-failed');
  });

  it('refuses a cookie and header pair the server did not sign', async () => {
    const h = await makeConsoleHarness();
    const forged = 'attacker-chosen.value';
    const res = await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('Cookie', `ebullio_csrf=${forged}`)
      .set('X-CSRF-Token', forged)
      .send({ email: 'admin@ebullio.invalid', password: PASSWORD });
    // OWASP CSRF Prevention cheat sheet, "Signed Double-Submit Cookie" (defeats cookie injection).
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/csrf-failed');
  });

  it('sets a CSRF cookie that scripts can read (not HttpOnly) and SameSite=Strict', async () => {
    const h = await makeConsoleHarness();
    const res = await request(h.app).get('/console-api/auth/csrf');
    const c = setCookies(res).get('ebullio_csrf');
    // Double-submit needs the page script to read the cookie (OWASP CSRF cheat sheet).
    expect(c?.attrs).not.toContain('HttpOnly');
    expect(c?.attrs).toContain('SameSite=Strict');
    expect(c?.value).toBe(res.body.csrfToken);
  });
});

describe('sign-in lock-out and rate limit', () => {
  it('locks an account after 5 consecutive failures for 15 minutes, then lets it in again', async () => {
    const h = await makeConsoleHarness();
    for (let i = 0; i < 5; i++) {
      expect((await signIn(h, 'admin@ebullio.invalid', 'not-the-password')).res.status).toBe(401);
    }
    // OWASP Authentication cheat sheet ("Account lockout"): threshold and duration; 5 / 15 min from the brief.
    const locked = await signIn(h, 'admin@ebullio.invalid');
    expect(locked.res.status).toBe(401);
    const wrong = await signIn(h, 'nobody@ebullio.invalid', 'x');
    expect(locked.res.body.detail).toBe(wrong.res.body.detail); // no hint that the account exists
    h.clock.now = new Date(h.clock.now.getTime() + 14 * 60_000);
    expect((await signIn(h, 'admin@ebullio.invalid')).res.status).toBe(401);
    h.clock.now = new Date(h.clock.now.getTime() + 61_000);
    const released = await signIn(h, 'admin@ebullio.invalid');
    expect(released.res.status).toBe(200);
    const [row] = await h.store.rows(
      sql`SELECT failed_sign_ins, locked_until FROM users WHERE id = ${h.users.admin.id}`,
    );
    expect(row).toEqual({ failed_sign_ins: 0, locked_until: null });
    const [lockouts] = await h.store.rows<{ n: number | string }>(
      sql`SELECT COUNT(*) AS n FROM audit_log WHERE action = 'auth.lock-out'`,
    );
    expect(Number(lockouts!.n)).toBe(1);
  });

  it('counts failures afresh after a lock has run out', async () => {
    const h = await makeConsoleHarness();
    for (let i = 0; i < 5; i++) await signIn(h, 'admin@ebullio.invalid', 'not-the-password');
    h.clock.now = new Date(h.clock.now.getTime() + 16 * 60_000);
    expect((await signIn(h, 'admin@ebullio.invalid', 'not-the-password')).res.status).toBe(401);
    // One failure after the window must not re-lock: the right password works.
    expect((await signIn(h, 'admin@ebullio.invalid')).res.status).toBe(200);
  });

  it('rate-limits sign-in attempts per address with the IETF RateLimit fields', async () => {
    const h = await makeConsoleHarness({ consoleSignInLimit: 3 });
    const statuses: number[] = [];
    let last;
    for (let i = 0; i < 4; i++) {
      last = (await signIn(h, `nobody${i}@ebullio.invalid`, 'x')).res;
      statuses.push(last.status);
    }
    expect(statuses).toEqual([401, 401, 401, 429]);
    expect(last!.body.type).toBe('/problems/rate-limited');
    // draft-ietf-httpapi-ratelimit-headers-07 fields (express-rate-limit standardHeaders 'draft-7').
    expect(last!.headers['ratelimit-policy']).toBeDefined();
  });
});
