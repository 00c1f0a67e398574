// Supertest agents that go through the real console pipeline: the CSRF double submit (token from
// GET /console-api/auth/csrf) and, once signed in, the session cookie from POST /auth/sign-in.
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent.js';
import { addMember, createUser, type Role } from '../../server/accounts/accounts.js';
import type { AppDeps, createApp } from '../../server/app.js';

type App = ReturnType<typeof createApp>;

export interface ConsoleAgent {
  agent: TestAgent;
  csrf: string;
}

/** An agent with a CSRF token and no session. */
export async function csrfAgent(app: App): Promise<ConsoleAgent> {
  const agent = request.agent(app);
  const res = await agent.get('/console-api/auth/csrf').expect(200);
  return { agent, csrf: (res.body as { csrfToken: string }).csrfToken };
}

/** An agent signed in as `email`, holding the CSRF token issued after the sign-in. */
export async function signedInAgent(app: App, email: string, password: string): Promise<ConsoleAgent> {
  const first = await csrfAgent(app);
  await first.agent
    .post('/console-api/auth/sign-in')
    .set('X-CSRF-Token', first.csrf)
    .send({ email, password })
    .expect(200);
  const again = await first.agent.get('/console-api/auth/csrf').expect(200);
  return { agent: first.agent, csrf: (again.body as { csrfToken: string }).csrfToken };
}

/**
 * Creates one user per role (`<role>@ebullio.invalid`, the developer a member of
 * `developerAccountId`) and signs each in, in the order admin, billing, developer.
 */
export async function signInOnePerRole(
  store: AppDeps['store'],
  app: App,
  opts: { password: string; developerAccountId: number; now: Date },
): Promise<Record<Role, ConsoleAgent & { userId: number }>> {
  const signedIn = {} as Record<Role, ConsoleAgent & { userId: number }>;
  for (const role of ['admin', 'billing', 'developer'] as const) {
    const email = `${role}@ebullio.invalid`;
    const user = await createUser(store, { email, password: opts.password, role, now: opts.now });
    if (role === 'developer') await addMember(store, user.id, opts.developerAccountId);
    signedIn[role] = { ...(await signedInAgent(app, email, opts.password)), userId: user.id };
  }
  return signedIn;
}
