// The role matrix: every console route in consoleRouteTable (including the routes other areas
// add) × admin, billing, developer and anonymous. A caller the route's `roles` allow must never be
// turned away by the access gate (any other answer below 500 is fine: 2xx, 404, 409, 422 for the
// empty probe input); a signed-in caller it does not allow gets exactly 403 'forbidden', an
// anonymous one exactly 401 'unauthorized'. Source: the brief's role definitions and the OWASP
// Authorization cheat sheet ("deny by default", enforce on the server for every request).
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import {
  allows,
  consoleRouteTable,
  ROLE_DENIED_PREFIX,
  SIGN_IN_REQUIRED_DETAIL,
  type Role,
} from '../../server/console/route.js';
import { Jar, csrf, makeConsoleHarness, mintSession } from './auth-harness.js';

type Caller = Role | 'anonymous';
const callers: Caller[] = ['admin', 'billing', 'developer', 'anonymous'];

describe('console role matrix', () => {
  it('answers every route × role exactly as the route declares', async () => {
    const h = await makeConsoleHarness();
    // Only routes declared by this app (the table is process-wide; createApp just registered them all).
    const routes = [...consoleRouteTable];
    expect(routes.length).toBeGreaterThan(10);
    const failures: string[] = [];
    let checks = 0;
    for (const route of routes) {
      const path =
        '/console-api' +
        route.path.replace(/:([A-Za-z0-9_]+)/g, (_m, name: string) =>
          name === 'token' ? 'not-a-token' : '1',
        );
      for (const caller of callers) {
        // A fresh session per probe: a probe of sign-out or a deactivation must not leak into the next.
        const jar =
          caller === 'anonymous' ? new Jar() : await mintSession(h, { id: h.users[caller].id, role: caller });
        const token = caller === 'anonymous' ? await csrf(h, jar) : jar.cookies.get('ebullio_csrf')!;
        let req = request(h.app)[route.method](path).set('Cookie', jar.header()).set('X-CSRF-Token', token);
        if (route.method !== 'get') req = req.send({});
        const res = await req;
        checks++;
        const detail = String(res.body?.detail ?? '');
        const gateDenied =
          (res.status === 401 && detail === SIGN_IN_REQUIRED_DETAIL) ||
          (res.status === 403 && detail.startsWith(ROLE_DENIED_PREFIX));
        const allowed = allows(route.access, caller === 'anonymous' ? undefined : caller);
        const label = `${route.method.toUpperCase()} ${route.path} as ${caller}: ${res.status} ${detail}`;
        if (allowed) {
          if (gateDenied || res.status >= 500) failures.push(`allowed but ${label}`);
        } else if (caller === 'anonymous') {
          if (res.status !== 401 || res.body?.type !== '/problems/unauthorized')
            failures.push(`expected 401, ${label}`);
        } else if (res.status !== 403 || res.body?.type !== '/problems/forbidden' || !gateDenied) {
          failures.push(`expected 403, ${label}`);
        }
      }
    }
    console.log(`role matrix: ${routes.length} routes × ${callers.length} callers = ${checks} checks`);
    expect(failures).toEqual([]);
  });

  it('always lets admins through and never lets anonymous callers past a role list', () => {
    // Brief: "admin (everything)"; deny by default (OWASP Authorization cheat sheet).
    for (const route of consoleRouteTable) {
      expect(allows(route.access, 'admin'), `${route.method} ${route.path}`).toBe(true);
      if (route.access !== 'public') expect(allows(route.access, undefined)).toBe(false);
    }
  });
});
