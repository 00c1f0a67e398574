/**
 * A monthly quota below the plan's included units is allowed (an account may cap itself), but it
 * is rarely meant: the account pays for units it can never use. The accounts form says so.
 */
import { formatCount } from './numbers.js';

export function quotaBelowIncludedWarning(
  quota: number | string,
  plan: { displayName: string; includedUnits: number } | undefined,
): string | undefined {
  const q = Number(quota);
  if (!plan || quota === '' || !Number.isFinite(q) || q >= plan.includedUnits) return undefined;
  return `The quota (${formatCount(q)} units) is below the ${formatCount(plan.includedUnits)} units the ${plan.displayName} plan includes: calls stop at the quota, so part of what the plan includes cannot be used.`;
}
