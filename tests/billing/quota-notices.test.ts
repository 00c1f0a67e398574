// Quota e-mails: quota-80 and quota-100, each once per account and calendar month (UTC).
// Rule from the issue 4 brief ("sends quota-80 / quota-100 once per account per month"); the
// thresholds are compared exactly in integers (used·100 ≥ t·quota), hand-computed below.
import { sql } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createAccount } from '../../server/accounts/accounts.js';
import { thresholdsReached } from '../../server/accounts/usage.js';
import { checkQuotaNotices, scheduleQuotaCheck } from '../../server/billing/quota-notices.js';
import { mailRows, makeBillingHarness, meter, type BillingHarness } from './harness.js';

let h: BillingHarness;
beforeAll(async () => {
  h = await makeBillingHarness({ now: '2031-05-10T08:00:00Z' });
});
afterAll(async () => {
  await h.close();
});

describe('quota thresholds', () => {
  it('reaches 80 % at exactly 800 of 1000 units and 100 % at exactly 1000', () => {
    // 799·100 = 79 900 < 80·1000 = 80 000; 800·100 = 80 000 ≥ 80 000 (hand-computed).
    expect(thresholdsReached(799, 1000)).toEqual([]);
    expect(thresholdsReached(800, 1000)).toEqual([80]);
    expect(thresholdsReached(999, 1000)).toEqual([80]);
    expect(thresholdsReached(1000, 1000)).toEqual([80, 100]);
    // A quota of 3: 80 % is 2.4 units → reached at 3 (2·100 = 200 < 240) (hand-computed).
    expect(thresholdsReached(2, 3)).toEqual([]);
    expect(thresholdsReached(0, 0)).toEqual([]);
  });
});

describe('checkQuotaNotices', () => {
  it('mails quota-80 once, then quota-100 once, then nothing more that month', async () => {
    const a = await createAccount(h.deps.store, {
      name: 'Invented Quota Works',
      monthlyUnitQuota: 1000,
      billingEmail: 'quota@works.invalid',
      now: h.clock.now,
    });
    const kinds = async () =>
      (await mailRows(h)).filter((m) => m.to === 'quota@works.invalid').map((m) => m.kind);
    await meter(h, a.id, 799, '2031-05-02T00:00:00Z');
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBeNull();
    await meter(h, a.id, 1, '2031-05-09T00:00:00Z');
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBe(80);
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBeNull();
    await meter(h, a.id, 200, '2031-05-09T01:00:00Z');
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBe(100);
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBeNull();
    expect(await kinds()).toEqual(['quota-80', 'quota-100']);

    // June: a new month starts from zero; jumping straight to 100 % sends only the 100 % notice.
    h.clock.now = new Date('2031-06-03T00:00:00Z');
    await meter(h, a.id, 1000, '2031-06-02T00:00:00Z');
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBe(100);
    expect((await checkQuotaNotices(h.deps, a.id)).sent).toBeNull();
    expect(await kinds()).toEqual(['quota-80', 'quota-100', 'quota-100']);
    const notices = await h.deps.store.rows(
      sql`SELECT month, threshold FROM quota_notices WHERE account_id = ${a.id} ORDER BY month, threshold`,
    );
    expect(notices).toEqual([
      { month: '2031-05', threshold: 80 },
      { month: '2031-05', threshold: 100 },
      { month: '2031-06', threshold: 80 },
      { month: '2031-06', threshold: 100 },
    ]);
    const [text] = await h.deps.store.rows<{ t: string }>(
      sql`SELECT text_body AS t FROM captured_mail WHERE subject LIKE '%quota used up%' ORDER BY id DESC`,
    );
    expect(text?.t).toContain('2031-07-01 00:00 UTC');
  });

  it('sends and records nothing for an account without a billing e-mail', async () => {
    const b = await createAccount(h.deps.store, {
      name: 'Invented Silent Mill',
      monthlyUnitQuota: 10,
      now: h.clock.now,
    });
    await meter(h, b.id, 10, h.clock.now.toISOString());
    expect((await checkQuotaNotices(h.deps, b.id)).sent).toBeNull();
    const [n] = await h.deps.store.rows<{ n: number | string }>(
      sql`SELECT COUNT(*) AS n FROM quota_notices WHERE account_id = ${b.id}`,
    );
    expect(Number(n?.n)).toBe(0);
  });

  it('runs after the current turn when scheduled, coalescing repeated calls', async () => {
    const c = await createAccount(h.deps.store, {
      name: 'Invented Deferred Co',
      monthlyUnitQuota: 100,
      billingEmail: 'later@deferred.invalid',
      now: h.clock.now,
    });
    await meter(h, c.id, 85, h.clock.now.toISOString());
    scheduleQuotaCheck(h.deps, c.id);
    scheduleQuotaCheck(h.deps, c.id);
    expect((await mailRows(h)).filter((m) => m.to === 'later@deferred.invalid')).toEqual([]); // not yet
    for (let i = 0; i < 100 && (await mailRows(h)).every((m) => m.to !== 'later@deferred.invalid'); i++) {
      await new Promise((r) => setTimeout(r, 20));
    }
    expect((await mailRows(h)).filter((m) => m.to === 'later@deferred.invalid').map((m) => m.kind)).toEqual([
      'quota-80',
    ]);
  });
});
