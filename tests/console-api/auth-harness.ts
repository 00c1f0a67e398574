// Test harness for the console API: the HTTP core's harness (in-memory database, injectable
// clock) plus console users of each role, a CSRF token, sign-in and session minting helpers,
// and a cookie jar that keeps the cookies the server sets (supertest's agent would drop Secure
// cookies over plain HTTP, so the jar is explicit).
import type { Response } from 'supertest';
import request from 'supertest';
import { addMember, createAccount, createUser } from '../../server/accounts/accounts.js';
import type { Config } from '../../server/config.js';
import { CSRF_COOKIE } from '../../shared/console/common.js';
import { issueSession } from '../../server/console/auth/session.js';
import type { Role } from '../../server/console/route.js';
import { makeHarness, type Harness } from '../http/helpers.js';

export const PASSWORD = 'correct horse battery staple';

export interface ConsoleHarness extends Harness {
  users: Record<Role, { id: number; email: string }>;
  otherAccountId: number;
}

export async function makeConsoleHarness(config: Partial<Config> = {}): Promise<ConsoleHarness> {
  const h = await makeHarness({ config: { consoleSignInLimit: 1000, ...config } });
  const otherAccountId = (await createAccount(h.store, { name: 'Invented Other Works', now: h.clock.now }))
    .id;
  const users = {} as ConsoleHarness['users'];
  for (const role of ['admin', 'billing', 'developer'] as const) {
    const u = await createUser(h.store, {
      email: `${role}@ebullio.invalid`,
      password: PASSWORD,
      role,
      now: h.clock.now,
    });
    users[role] = { id: u.id, email: u.email };
  }
  await addMember(h.store, users.developer.id, h.accountId);
  return { ...h, users, otherAccountId };
}

/** Parses Set-Cookie headers into name → { value, attributes }. */
export function setCookies(res: Response): Map<string, { value: string; attrs: string[]; raw: string }> {
  const header = res.headers['set-cookie'] as unknown as string[] | string | undefined;
  const list = header === undefined ? [] : Array.isArray(header) ? header : [header];
  const out = new Map<string, { value: string; attrs: string[]; raw: string }>();
  for (const raw of list) {
    const [pair = '', ...attrs] = raw.split(';').map((s) => s.trim());
    const eq = pair.indexOf('=');
    out.set(pair.slice(0, eq), { value: decodeURIComponent(pair.slice(eq + 1)), attrs, raw });
  }
  return out;
}

/** A minimal cookie jar: remembers the latest value of each cookie (cleared ones are dropped). */
export class Jar {
  readonly cookies = new Map<string, string>();
  take(res: Response): Response {
    for (const [name, c] of setCookies(res)) {
      if (c.value === '' || c.attrs.some((a) => /^expires=Thu, 01 Jan 1970/i.test(a)))
        this.cookies.delete(name);
      else this.cookies.set(name, c.value);
    }
    return res;
  }
  header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${encodeURIComponent(v)}`).join('; ');
  }
}

/** A jar holding a fresh CSRF cookie; returns the token for the X-CSRF-Token header. */
export async function csrf(h: Harness, jar: Jar): Promise<string> {
  const res = jar.take(await request(h.app).get('/console-api/auth/csrf').set('Cookie', jar.header()));
  return (res.body as { csrfToken: string }).csrfToken;
}

export async function signIn(
  h: Harness,
  email: string,
  password = PASSWORD,
  jar = new Jar(),
): Promise<{ jar: Jar; token: string; res: Response }> {
  const token = await csrf(h, jar);
  const res = jar.take(
    await request(h.app)
      .post('/console-api/auth/sign-in')
      .set('Cookie', jar.header())
      .set('X-CSRF-Token', token)
      .send({ email, password }),
  );
  // A successful sign-in replaces the CSRF cookie with a token bound to the new session.
  return { jar, token: jar.cookies.get(CSRF_COOKIE) ?? token, res };
}

/** A session for a user without the password round trip (fast; for the role matrix). */
export async function mintSession(h: Harness, user: { id: number; role: Role }): Promise<Jar> {
  const jar = new Jar();
  const fakeRes = {
    locals: {} as Record<string, unknown>,
    cookie(name: string, value: string) {
      jar.cookies.set(name, value);
    },
  };
  const fakeReq = { secure: false, ip: '127.0.0.1', get: () => undefined };
  await issueSession(h.deps, fakeReq as never, fakeRes as never, user);
  await csrf(h, jar);
  return jar;
}
