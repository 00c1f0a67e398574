// Quota e-mails are triggered by the metering path itself: real authenticated requests that
// cross 80 % and then 100 % of the monthly quota mail the account's billing address once each.
// Rule: issue 4 ("quota at 80 % and 100 %, once per month each").
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { updateAccount } from '../../server/accounts/accounts.js';
import { makeHarness, type Harness } from '../http/helpers.js';

async function mailKinds(h: Harness): Promise<string[]> {
  const { mailLog } = h.store.t;
  return (await h.store.db.select({ kind: mailLog.kind }).from(mailLog).orderBy(mailLog.id)).map(
    (r) => r.kind,
  );
}

async function settle(h: Harness, kinds: number): Promise<void> {
  // The check runs after the response (setImmediate) and mails over SMTP: wait for the rows.
  for (let i = 0; i < 200 && (await mailKinds(h)).length < kinds; i++)
    await new Promise((r) => setTimeout(r, 25));
}

describe('quota e-mails from metered requests', () => {
  it('mails quota-80 when a request crosses 80 %, quota-100 at 100 %, and nothing more', async () => {
    const h = await makeHarness({ quota: 25 });
    await updateAccount(h.store, h.accountId, { billingEmail: 'plant-billing@works.invalid' });
    const charge = (extra: number) =>
      request(h.app)
        .post(`/v1/__test/charge?extra=${extra}`)
        .set('Authorization', `Bearer ${h.token}`)
        .send({});
    // Each call costs 5 units plus `extra`. 15 of 25 units (60 %): below the first threshold.
    expect((await charge(10)).status).toBe(200);
    await new Promise((r) => setTimeout(r, 50));
    expect(await mailKinds(h)).toEqual([]);
    // 20 of 25 = 80 %: quota-80.
    expect((await charge(0)).status).toBe(200);
    await settle(h, 1);
    expect(await mailKinds(h)).toEqual(['quota-80']);
    // 25 of 25 = 100 %: quota-100, once.
    expect((await charge(0)).status).toBe(200);
    await settle(h, 2);
    expect(await mailKinds(h)).toEqual(['quota-80', 'quota-100']);
    // Over quota: 429, no calculation, no further mail.
    expect((await charge(0)).status).toBe(429);
    await new Promise((r) => setTimeout(r, 100));
    expect(await mailKinds(h)).toEqual(['quota-80', 'quota-100']);
  });
});
