// Console accounts routes: admin writes, billing reads, developer refused; plan validated against
// the plans table; every mutation audited.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeConsoleHarness, meter, type ConsoleHarness } from './data-harness.js';
import { createKey } from '../../server/accounts/keys.js';
import { signingSecretOf } from '../../server/accounts/signing-secrets.js';

let h: ConsoleHarness;
beforeAll(async () => {
  h = await makeConsoleHarness();
});
afterAll(async () => {
  await h.close();
});

describe('GET /console-api/accounts', () => {
  it('lists every account with this month’s units, quota share and active keys for admin and billing', async () => {
    const { key } = await createKey(h.deps.store, h.deps.config.secret, {
      accountId: h.alphaId,
      name: 'k',
      scopes: ['steam'],
      now: h.clock.now,
    });
    await meter(h, { accountId: h.alphaId, keyId: key.id, units: 250 });
    await meter(h, { accountId: h.alphaId, keyId: key.id, units: 50 });
    for (const who of [h.admin, h.billing]) {
      const res = await who.agent.get('/console-api/accounts').expect(200);
      const alpha = (res.body.items as { id: number }[]).find((a) => a.id === h.alphaId) as Record<
        string,
        unknown
      >;
      // 300 units of a 1000 quota = 30 % (arithmetic on the seeded rows).
      expect(alpha).toMatchObject({
        name: 'Invented Alpha Works',
        unitsThisMonth: 300,
        quotaUsedPercent: 30,
        keyCount: 1,
      });
      expect(res.body.items).toHaveLength(2);
    }
  });

  it('refuses a developer with 403 forbidden (accounts are not a developer area)', async () => {
    const res = await h.developer.agent.get('/console-api/accounts').expect(403);
    // RFC 9457: problem details with a type URI.
    expect(res.type).toBe('application/problem+json');
    expect(res.body.type).toBe('/problems/forbidden');
  });
});

describe('POST /console-api/accounts', () => {
  it('creates an account, answers 201 with it and records who did it in the audit log', async () => {
    const res = await h.admin.agent
      .post('/console-api/accounts')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({
        name: 'Invented Gamma Refinery',
        plan: 'works',
        monthlyUnitQuota: 5000,
        billingEmail: 'pay@gamma.invalid',
      })
      .expect(201);
    expect(res.body).toMatchObject({
      name: 'Invented Gamma Refinery',
      plan: 'works',
      monthlyUnitQuota: 5000,
      unitsThisMonth: 0,
    });
    expect(res.headers.location).toBe(`/console-api/accounts/${res.body.id}`);
    const audit = (await h.deps.store.db.select().from(h.deps.store.t.auditLog)).filter(
      (a) => a.action === 'account.create',
    );
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({
      actorEmail: 'admin@ebullio.invalid',
      targetType: 'account',
      targetId: String(res.body.id),
    });
  });

  it('rejects a plan that is not in the plans table with the known plans', async () => {
    const res = await h.admin.agent
      .post('/console-api/accounts')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ name: 'Invented Delta', plan: 'platinum', monthlyUnitQuota: 10 })
      .expect(422);
    expect(res.body.errors[0]).toMatchObject({ field: 'plan', message: 'must be one of: starter, works' });
  });

  it('rejects a negative quota and a malformed e-mail with the field paths', async () => {
    const res = await h.admin.agent
      .post('/console-api/accounts')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ name: 'Invented Delta', plan: 'starter', monthlyUnitQuota: -1, billingEmail: 'not-an-address' })
      .expect(422);
    const fields = (res.body.errors as { field: string }[]).map((e) => e.field).sort();
    expect(fields).toEqual(['billingEmail', 'monthlyUnitQuota']);
  });

  it('refuses billing users (read-only on accounts) and requests without the CSRF header', async () => {
    await h.billing.agent
      .post('/console-api/accounts')
      .set('X-CSRF-Token', h.billing.csrf)
      .send({ name: 'X', plan: 'starter', monthlyUnitQuota: 1 })
      .expect(403);
    // OWASP CSRF Prevention Cheat Sheet, double-submit cookie: no header → refused.
    const res = await h.admin.agent
      .post('/console-api/accounts')
      .send({ name: 'X', plan: 'starter', monthlyUnitQuota: 1 });
    expect(res.status).toBe(403);
    expect(res.body.type).toBe('/problems/csrf-failed');
  });
});

describe('PATCH /console-api/accounts/:id', () => {
  it('changes only the given fields and audits the before and after values', async () => {
    const res = await h.admin.agent
      .patch(`/console-api/accounts/${h.betaId}`)
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ monthlyUnitQuota: 800, retainRequestBodies: true })
      .expect(200);
    expect(res.body).toMatchObject({
      name: 'Invented Beta Mills',
      monthlyUnitQuota: 800,
      retainRequestBodies: true,
    });
    const audit = (await h.deps.store.db.select().from(h.deps.store.t.auditLog)).find(
      (a) => a.action === 'account.update',
    );
    expect(audit?.detail).toEqual({
      changes: { monthlyUnitQuota: { from: 500, to: 800 }, retainRequestBodies: { from: false, to: true } },
    });
  });

  it('rejects an empty patch and answers 404 for an unknown account', async () => {
    await h.admin.agent
      .patch(`/console-api/accounts/${h.betaId}`)
      .set('X-CSRF-Token', h.admin.csrf)
      .send({})
      .expect(422);
    await h.admin.agent
      .patch('/console-api/accounts/9999')
      .set('X-CSRF-Token', h.admin.csrf)
      .send({ name: 'Y' })
      .expect(404);
    await h.billing.agent.get(`/console-api/accounts/${h.alphaId}`).expect(200);
  });
});

describe('POST /console-api/accounts/{id}/signing-secret', () => {
  it('makes a signing secret shown once, stored encrypted and readable to sign, for an admin or a member developer', async () => {
    const first = await h.admin.agent
      .post(`/console-api/accounts/${h.alphaId}/signing-secret`)
      .set('X-CSRF-Token', h.admin.csrf)
      .expect(201);
    expect(first.body).toMatchObject({ accountId: h.alphaId });
    expect(first.body.secret).toMatch(/^ebs1_[A-Za-z0-9_-]{43}$/);
    // Stored sealed, never as the secret itself; read back in clear to sign.
    const [row] = await h.deps.store.db.select().from(h.deps.store.t.accountSigningSecrets);
    expect(row!.secret).not.toContain(first.body.secret);
    expect(await signingSecretOf(h.deps.store, h.deps.config.secret, h.alphaId)).toBe(first.body.secret);
    // A member developer rotates it: the old one stops signing.
    const second = await h.developer.agent
      .post(`/console-api/accounts/${h.alphaId}/signing-secret`)
      .set('X-CSRF-Token', h.developer.csrf)
      .expect(201);
    expect(second.body.secret).not.toBe(first.body.secret);
    expect(await signingSecretOf(h.deps.store, h.deps.config.secret, h.alphaId)).toBe(second.body.secret);
    const audit = (await h.deps.store.db.select().from(h.deps.store.t.auditLog)).filter(
      (a) => a.action === 'account.signing-secret.rotate',
    );
    expect(audit).toHaveLength(2);
    // Not a member: refused, nothing made.
    await h.developer.agent
      .post(`/console-api/accounts/${h.betaId}/signing-secret`)
      .set('X-CSRF-Token', h.developer.csrf)
      .expect(403);
    expect(await signingSecretOf(h.deps.store, h.deps.config.secret, h.betaId)).toBeUndefined();
  });
});
