/**
 * Quota e-mails: 'quota-80' when an account has used 80 % of its monthly unit quota, 'quota-100'
 * when it has used all of it — each at most once per account and calendar month (UTC), recorded in
 * quota_notices. Sent to the account's billing e-mail; an account without one gets nothing and
 * nothing is recorded (so a notice still goes out once an address is set).
 *
 * If both thresholds are first reached at the same check only the 100 % mail is sent (it says the
 * 80 % mark has passed), and both are recorded. A failed send un-records its notice so a later
 * check retries.
 *
 * Hot path: call {@link scheduleQuotaCheck} after metering; it defers the work with setImmediate
 * and coalesces repeated calls for the same account.
 */
import { and, eq, inArray } from 'drizzle-orm';
import { getAccount } from '../accounts/accounts.js';
import {
  nextMonthStartUtc,
  thresholdsReached,
  unitsUsedThisMonth,
  utcMonth,
  type QuotaThreshold,
} from '../accounts/usage.js';
import type { AppDeps } from '../deps.js';
import { sendMail } from '../mail/send.js';

export interface QuotaCheckResult {
  month: string;
  used: number;
  quota: number;
  /** The notice mailed by this check, if any. */
  sent: QuotaThreshold | null;
}

function noticeText(
  name: string,
  threshold: QuotaThreshold,
  used: number,
  quota: number,
  resetsAt: Date,
): string {
  const reset = resetsAt.toISOString().replace('T', ' ').replace(':00.000Z', ' UTC');
  if (threshold === 100) {
    return [
      `The Ebullio account "${name}" has used its whole monthly quota: ${used} of ${quota} units.`,
      '',
      'Calculation requests that need more units are now refused (HTTP 429, quota-exceeded) until the',
      `quota resets at ${reset}. If a plant or a process relies on these calculations, ask your`,
      'Ebullio administrator to raise the quota before then.',
    ].join('\n');
  }
  return [
    `The Ebullio account "${name}" has used ${Math.floor((used * 100) / quota)} % of its monthly quota: ${used} of ${quota} units.`,
    '',
    `When the quota is used up, calculation requests are refused until it resets at ${reset}.`,
  ].join('\n');
}

/** Checks one account now and sends the quota notice that is due, if any. */
export async function checkQuotaNotices(deps: AppDeps, accountId: number): Promise<QuotaCheckResult> {
  const now = deps.clock();
  const month = utcMonth(now);
  const account = await getAccount(deps.store, accountId);
  if (!account) return { month, used: 0, quota: 0, sent: null };
  const quota = account.monthlyUnitQuota;
  const used = await unitsUsedThisMonth(deps.store, accountId, now);
  const result: QuotaCheckResult = { month, used, quota, sent: null };
  const reached = thresholdsReached(used, quota);
  if (reached.length === 0 || !account.billingEmail) return result;

  // Claim the thresholds atomically: only the check that inserts a row mails it.
  const { quotaNotices } = deps.store.t;
  const claimed = (
    await deps.store.db
      .insert(quotaNotices)
      .values(reached.map((threshold) => ({ accountId, month, threshold, sentAt: now })))
      .onConflictDoNothing()
      .returning()
  ).map((r) => r.threshold as QuotaThreshold);
  if (claimed.length === 0) return result;
  const highest = Math.max(...claimed) as QuotaThreshold;
  const mail = await sendMail(deps, {
    kind: highest === 100 ? 'quota-100' : 'quota-80',
    to: account.billingEmail,
    subject:
      highest === 100
        ? `Ebullio: monthly quota used up (${account.name})`
        : `Ebullio: 80 % of the monthly quota used (${account.name})`,
    text: noticeText(account.name, highest, used, quota, nextMonthStartUtc(now)),
  });
  if (mail.status !== 'sent') {
    await deps.store.db
      .delete(quotaNotices)
      .where(
        and(
          eq(quotaNotices.accountId, accountId),
          eq(quotaNotices.month, month),
          inArray(quotaNotices.threshold, claimed),
        ),
      );
    return result;
  }
  result.sent = highest;
  return result;
}

const pending = new WeakMap<AppDeps, Set<number>>();

/**
 * Runs {@link checkQuotaNotices} after the current I/O turn (setImmediate), so the response is not
 * delayed; several calls for one account before it runs collapse into one check. Never throws.
 */
export function scheduleQuotaCheck(deps: AppDeps, accountId: number): void {
  let set = pending.get(deps);
  if (!set) {
    set = new Set();
    pending.set(deps, set);
  }
  if (set.has(accountId)) return;
  set.add(accountId);
  setImmediate(() => {
    set.delete(accountId);
    checkQuotaNotices(deps, accountId).catch((err: unknown) => {
      console.error(`[quota] notice check for account ${accountId} failed:`, err);
    });
  });
}
