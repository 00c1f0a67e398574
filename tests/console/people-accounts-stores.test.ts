// The users and accounts stores against a scripted console API: the endpoint and body of each
// action, the reload after a change, and the flags and problems the pages show.
// Sources: the console API contract (shared/console/users.ts: GET /users → {items, invitations},
// POST /users/invitations, POST /users/invitations/:id/withdraw, PATCH /users/:id;
// shared/console/accounts.ts: GET/POST /accounts, PATCH /accounts/:id; shared/console/billing.ts:
// GET /plans) and RFC 9457 problem details.
import { flushPromises } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it } from 'vitest';
import { createApiClient } from '../../console/src/api/client.js';
import type { UserSummary } from '../../console/src/api/types.js';
import { useAccountsClient, useAccountsStore } from '../../console/src/stores/accounts.js';
import { useUsersClient, useUsersStore } from '../../console/src/stores/users.js';
import { fakeFetch, json } from './fake-fetch.js';
import type { InvitationSummary } from '../../shared/console/users.js';

const ada: UserSummary = {
  id: 7,
  email: 'ada@kettleworks.test',
  name: 'Ada',
  role: 'developer',
  active: true,
  accountIds: [2],
  createdAt: '2031-03-01T10:00:00.000Z',
  lockedUntil: null,
};
const invitation: InvitationSummary = {
  id: 4,
  email: 'bo@kettleworks.test',
  role: 'billing',
  accountIds: [],
  createdAt: '2031-03-02T10:00:00.000Z',
  expiresAt: '2031-03-09T10:00:00.000Z',
  invitedBy: 'ada@kettleworks.test',
};
const forbidden = { type: '/problems/forbidden', title: 'Forbidden', status: 403, detail: 'Admins only.' };

beforeEach(() => setActivePinia(createPinia()));

describe('users store', () => {
  function usersWith(routes: Parameters<typeof fakeFetch>[0]) {
    const f = fakeFetch(routes);
    useUsersClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    return { f, store: useUsersStore() };
  }

  it('keeps the users and the open invitations of GET /users', async () => {
    const { store } = usersWith({
      'GET /console-api/users': () => json(200, { items: [ada], invitations: [invitation] }),
    });
    await store.load();
    expect(store.users).toEqual([ada]);
    expect(store.invitations.map((i) => i.email)).toEqual(['bo@kettleworks.test']);
    expect(store.loading).toBe(false);
    expect(store.error).toBeNull();
  });

  it('names accounts from GET /accounts, and an unknown one by number', async () => {
    const { store } = usersWith({
      'GET /console-api/accounts': () => json(200, { items: [{ id: 2, name: 'Kettle Works' }] }),
    });
    await store.loadAccounts();
    expect(store.accountName(2)).toBe('Kettle Works');
    expect(store.accountName(9)).toBe('#9');
  });

  it('sends an invitation, returns the answer and reloads the list', async () => {
    const { f, store } = usersWith({
      'POST /console-api/users/invitations': () => json(201, { invitation, mailStatus: 'failed' }),
      'GET /console-api/users': () => json(200, { items: [ada], invitations: [invitation] }),
    });
    const body = { email: 'bo@kettleworks.test', role: 'billing' as const, accountIds: [] };
    const created = await store.invite(body);
    await flushPromises();
    expect(created?.mailStatus).toBe('failed');
    expect(f.calls[0]).toMatchObject({ method: 'POST', body });
    expect(store.invitations).toHaveLength(1);
    expect(store.inviteBusy).toBe(false);
  });

  it('keeps a refused invitation as the form’s problem, naming the field', async () => {
    const { store } = usersWith({
      'POST /console-api/users/invitations': () =>
        json(409, {
          type: '/problems/conflict',
          title: 'Conflict',
          status: 409,
          errors: [{ field: 'email', message: 'already has console access' }],
        }),
    });
    expect(await store.invite({ email: 'ada@kettleworks.test', role: 'admin', accountIds: [] })).toBeNull();
    expect(store.inviteError?.fieldMessage('email')).toBe('already has console access');
  });

  it('patches /users/:id with only the changed fields and passes a refusal on', async () => {
    const { f, store } = usersWith({
      'PATCH /console-api/users/7': (_c, n) =>
        n === 1 ? json(200, { ...ada, active: false }) : json(403, forbidden),
      'GET /console-api/users': () => json(200, { items: [{ ...ada, active: false }], invitations: [] }),
    });
    await store.update(ada, { active: false });
    expect(f.calls[0]).toMatchObject({ method: 'PATCH', body: { active: false } });
    expect(store.users[0]?.active).toBe(false); // reloaded before the action returns
    await expect(store.update(ada, { role: 'admin' })).rejects.toMatchObject({ status: 403 });
  });

  it('marks the invitation being withdrawn until the server answers', async () => {
    let release!: () => void;
    const { store } = usersWith({
      'POST /console-api/users/invitations/4/withdraw': () =>
        new Promise<Response>((r) => (release = () => r(json(200, invitation)))),
      'GET /console-api/users': () => json(200, { items: [ada], invitations: [] }),
    });
    const done = store.withdraw(invitation);
    await flushPromises();
    expect(store.withdrawingId).toBe(4);
    release();
    await done;
    expect(store.withdrawingId).toBeNull();
    expect(store.invitations).toEqual([]);
  });
});

describe('accounts store', () => {
  function accountsWith(routes: Parameters<typeof fakeFetch>[0]) {
    const f = fakeFetch(routes);
    useAccountsClient(createApiClient({ fetch: f.fetch, readCookie: () => 'tok' }));
    return { f, store: useAccountsStore() };
  }
  const body = {
    name: 'Dairy Co-op',
    plan: 'starter',
    monthlyUnitQuota: 10_000,
    billingEmail: null,
    retainRequestBodies: false,
  };

  it('creates with POST /accounts and edits with PATCH /accounts/:id, reloading after each', async () => {
    const { f, store } = accountsWith({
      'POST /console-api/accounts': () => json(201, { id: 9, ...body }),
      'PATCH /console-api/accounts/9': () => json(200, { id: 9, ...body }),
      'GET /console-api/accounts': () => json(200, { items: [{ id: 9, ...body }] }),
    });
    expect(await store.save(null, body)).toBe(true);
    expect(await store.save(9, { ...body, plan: 'plant' })).toBe(true);
    await flushPromises();
    expect(f.calls.map((c) => `${c.method} ${c.path}`)).toEqual([
      'POST /console-api/accounts',
      'GET /console-api/accounts',
      'PATCH /console-api/accounts/9',
      'GET /console-api/accounts',
    ]);
    expect(f.calls[2]?.body).toMatchObject({ plan: 'plant' });
    expect(store.accounts.map((a) => a.id)).toEqual([9]);
    expect(store.saving).toBe(false);
  });

  it('keeps a refused save as the form’s problem and reports false', async () => {
    const { store } = accountsWith({
      'POST /console-api/accounts': () =>
        json(422, {
          type: '/problems/validation-failed',
          title: 'Validation failed',
          status: 422,
          errors: [{ field: 'monthlyUnitQuota', message: 'must be between 0 and 1000000000' }],
        }),
    });
    expect(await store.save(null, { ...body, monthlyUnitQuota: -1 })).toBe(false);
    expect(store.formError?.fieldMessage('monthlyUnitQuota')).toBe('must be between 0 and 1000000000');
  });

  it('makes a signing secret with POST /accounts/:id/signing-secret and hands it back once, or keeps the problem', async () => {
    const made = { accountId: 9, secret: `ebs1_${'a'.repeat(43)}`, createdAt: '2031-03-14T10:00:00.000Z' };
    const { f, store } = accountsWith({
      'POST /console-api/accounts/9/signing-secret': () => json(201, made),
      'POST /console-api/accounts/8/signing-secret': () => json(403, forbidden),
    });
    expect(await store.rotateSigningSecret(9)).toEqual(made);
    expect(f.calls.map((c) => `${c.method} ${c.path}`)).toEqual([
      'POST /console-api/accounts/9/signing-secret',
    ]);
    // The store keeps no copy of the secret: the page shows it once and forgets it.
    expect(JSON.stringify(store.$state)).not.toContain(made.secret);
    expect(await store.rotateSigningSecret(8)).toBeNull();
    expect(store.formError?.status).toBe(403);
    expect(store.saving).toBe(false);
  });

  it('holds the list’s problem for the page, and no plans when GET /plans fails', async () => {
    const { store } = accountsWith({
      'GET /console-api/accounts': () => json(403, forbidden),
      'GET /console-api/plans': () => json(403, forbidden),
    });
    await store.load();
    await store.loadPlans();
    expect(store.error?.status).toBe(403);
    expect(store.error?.detail).toBe('Admins only.');
    expect(store.plans).toEqual([]); // the page then takes the plan as free text
    expect(store.loading).toBe(false);
  });
});
