/**
 * Statement maths: pure functions, integers only (money in the currency's minor unit).
 *
 *   overageUnits  = max(0, units − includedUnits)
 *   overageBlocks = ceil(overageUnits / 1000)   rounding rule: every STARTED block of 1000 units is
 *                                               billed in full (1 unit over → 1 block; 1000 → 1; 1001 → 2)
 *   amountMinor   = monthlyFeeMinor + overageBlocks × pricePer1000UnitsMinor
 *
 * No fractional money ever arises, so there is no rounding of amounts: only the block count rounds.
 */

export interface PlanPrices {
  displayName: string;
  includedUnits: number;
  monthlyFeeMinor: number;
  pricePer1000UnitsMinor: number;
  currency: string;
}

export interface LineItem {
  code: 'monthly-fee' | 'overage';
  description: string;
  quantity: number;
  unitAmountMinor: number;
  amountMinor: number;
}

export interface StatementFigures {
  units: number;
  includedUnits: number;
  overageUnits: number;
  overageBlocks: number;
  amountMinor: number;
  currency: string;
  lineItems: LineItem[];
}

export const UNITS_PER_BLOCK = 1000;

function requireCount(name: string, value: number): void {
  if (!Number.isSafeInteger(value) || value < 0) {
    throw new RangeError(`${name} must be a non-negative integer, got ${value}`);
  }
}

/** ceil(overage / 1000) in integers. */
export function overageBlocks(overageUnits: number): number {
  requireCount('overageUnits', overageUnits);
  return Math.floor((overageUnits + UNITS_PER_BLOCK - 1) / UNITS_PER_BLOCK);
}

/** The figures and line items of one month for `units` metered on a plan. */
/**
 * A count in statement and invoice text, with a thousands separator: 50000 → "50,000". One
 * fixed style (en), because the same text goes to the payment provider's invoice.
 */
const countFormat = new Intl.NumberFormat('en-US', { maximumFractionDigits: 0 });
export function formatCount(n: number): string {
  return countFormat.format(n);
}

export function computeStatement(units: number, plan: PlanPrices): StatementFigures {
  requireCount('units', units);
  requireCount('includedUnits', plan.includedUnits);
  requireCount('monthlyFeeMinor', plan.monthlyFeeMinor);
  requireCount('pricePer1000UnitsMinor', plan.pricePer1000UnitsMinor);
  const overageUnits = Math.max(0, units - plan.includedUnits);
  const blocks = overageBlocks(overageUnits);
  const overageMinor = blocks * plan.pricePer1000UnitsMinor;
  const amountMinor = plan.monthlyFeeMinor + overageMinor;
  if (!Number.isSafeInteger(amountMinor)) throw new RangeError('statement amount overflows');
  const lineItems: LineItem[] = [];
  if (plan.monthlyFeeMinor > 0) {
    lineItems.push({
      code: 'monthly-fee',
      description: `${plan.displayName} plan, monthly fee (includes ${formatCount(plan.includedUnits)} units)`,
      quantity: 1,
      unitAmountMinor: plan.monthlyFeeMinor,
      amountMinor: plan.monthlyFeeMinor,
    });
  }
  if (blocks > 0) {
    lineItems.push({
      code: 'overage',
      description: `${formatCount(overageUnits)} units beyond the included ${formatCount(plan.includedUnits)}, billed per started block of ${formatCount(UNITS_PER_BLOCK)}`,
      quantity: blocks,
      unitAmountMinor: plan.pricePer1000UnitsMinor,
      amountMinor: overageMinor,
    });
  }
  return {
    units,
    includedUnits: plan.includedUnits,
    overageUnits,
    overageBlocks: blocks,
    amountMinor,
    currency: plan.currency,
    lineItems,
  };
}

/** First day of the month and first day of the next month, 'YYYY-MM-DD' (UTC); throws on a bad month. */
export function monthDayRange(month: string): { fromDay: string; toDay: string } {
  const m = /^(\d{4})-(0[1-9]|1[0-2])$/.exec(month);
  if (!m) throw new RangeError(`month must be YYYY-MM, got "${month}"`);
  const year = Number(m[1]);
  const monthIndex = Number(m[2]) - 1;
  const from = new Date(Date.UTC(year, monthIndex, 1));
  const to = new Date(Date.UTC(year, monthIndex + 1, 1));
  return { fromDay: from.toISOString().slice(0, 10), toDay: to.toISOString().slice(0, 10) };
}

/** True once `now` has reached the first instant of the following month (UTC). */
export function isMonthComplete(month: string, now: Date): boolean {
  return now.toISOString().slice(0, 10) >= monthDayRange(month).toDay;
}

/** Formats a minor-unit amount for people, e.g. (12345, 'eur') → "€123.45". */
export function formatMoney(amountMinor: number, currency: string): string {
  const format = new Intl.NumberFormat('en-IE', { style: 'currency', currency: currency.toUpperCase() });
  const digits = format.resolvedOptions().maximumFractionDigits ?? 2;
  return format.format(amountMinor / 10 ** digits);
}
