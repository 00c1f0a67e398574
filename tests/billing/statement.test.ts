// Statement maths. Expected figures are hand-computed from the billing rule written in the
// project's issue 4 brief ("amount = fee + ceil(overage/1000)·price, money as integers in minor
// units"), not from our code; each case shows its arithmetic.
import { describe, expect, it } from 'vitest';
import {
  computeStatement,
  formatMoney,
  isMonthComplete,
  monthDayRange,
  overageBlocks,
} from '../../server/billing/statement.js';

// An invented plan for the tests: 10 000 units included, €29.00 fee, €1.20 per started 1000 units.
const plan = {
  displayName: 'Test tier',
  includedUnits: 10_000,
  monthlyFeeMinor: 2_900,
  pricePer1000UnitsMinor: 120,
  currency: 'eur',
};

describe('statement amount', () => {
  it('charges only the fee when usage is below the included units', () => {
    // 9 999 units: overage max(0, 9999 − 10000) = 0; amount = 2900 + 0·120 = 2900 (hand-computed).
    const s = computeStatement(9_999, plan);
    expect([s.overageUnits, s.overageBlocks, s.amountMinor]).toEqual([0, 0, 2_900]);
  });

  it('charges only the fee at exactly the included units', () => {
    // 10 000 units: overage 0; amount 2900 (hand-computed boundary).
    const s = computeStatement(10_000, plan);
    expect([s.overageUnits, s.overageBlocks, s.amountMinor]).toEqual([0, 0, 2_900]);
    expect(s.lineItems.map((l) => l.code)).toEqual(['monthly-fee']);
  });

  it('bills a whole block for one unit over the included units', () => {
    // 10 001 units: overage 1; ceil(1/1000) = 1 block; amount = 2900 + 1·120 = 3020 (hand-computed).
    const s = computeStatement(10_001, plan);
    expect([s.overageUnits, s.overageBlocks, s.amountMinor]).toEqual([1, 1, 3_020]);
  });

  it('bills exactly one block for 1000 units over and two for 1001 over', () => {
    // 11 000: overage 1000, ceil(1000/1000) = 1, amount 3020; 11 001: overage 1001, ceil = 2,
    // amount = 2900 + 2·120 = 3140 (hand-computed).
    expect(computeStatement(11_000, plan).amountMinor).toBe(3_020);
    const s = computeStatement(11_001, plan);
    expect([s.overageBlocks, s.amountMinor]).toEqual([2, 3_140]);
  });

  it('itemises a larger overage so the lines sum to the amount', () => {
    // 123 456 units: overage 113 456; ceil(113.456) = 114 blocks; 114·120 = 13 680;
    // amount = 2900 + 13 680 = 16 580 (hand-computed).
    const s = computeStatement(123_456, plan);
    expect(s.lineItems).toEqual([
      expect.objectContaining({
        code: 'monthly-fee',
        quantity: 1,
        unitAmountMinor: 2_900,
        amountMinor: 2_900,
      }),
      expect.objectContaining({ code: 'overage', quantity: 114, unitAmountMinor: 120, amountMinor: 13_680 }),
    ]);
    expect(s.amountMinor).toBe(16_580);
    expect(s.lineItems.reduce((sum, l) => sum + l.amountMinor, 0)).toBe(s.amountMinor);
  });

  it('has no fee line and a zero amount on a plan with no fee within the included units', () => {
    // Fee 0, 500 of 1000 included units used: amount 0, no line items (hand-computed).
    const free = { ...plan, includedUnits: 1_000, monthlyFeeMinor: 0 };
    const s = computeStatement(500, free);
    expect(s.amountMinor).toBe(0);
    expect(s.lineItems).toEqual([]);
    // Same plan, 2 500 units: overage 1500 → 2 blocks → 2·120 = 240, only the overage line.
    const over = computeStatement(2_500, free);
    expect(over.amountMinor).toBe(240);
    expect(over.lineItems.map((l) => l.code)).toEqual(['overage']);
  });

  it('bills zero units as the fee alone', () => {
    // 0 units: amount = fee = 2900 (hand-computed).
    expect(computeStatement(0, plan).amountMinor).toBe(2_900);
  });

  it('refuses negative or fractional unit counts', () => {
    // Units are integers ≥ 0 by definition of the usage roll-up (common practice for metering).
    expect(() => computeStatement(-1, plan)).toThrow(RangeError);
    expect(() => computeStatement(1.5, plan)).toThrow(RangeError);
    expect(() => overageBlocks(Number.NaN)).toThrow(RangeError);
  });
});

describe('calendar months (UTC)', () => {
  it('spans a month to the first day of the next, across a year end and a leap February', () => {
    // Gregorian calendar: 2032 is a leap year (divisible by 4, not by 100), from memory of the rule.
    expect(monthDayRange('2031-12')).toEqual({ fromDay: '2031-12-01', toDay: '2032-01-01' });
    expect(monthDayRange('2032-02')).toEqual({ fromDay: '2032-02-01', toDay: '2032-03-01' });
    expect(() => monthDayRange('2031-13')).toThrow(RangeError);
  });

  it('calls a month complete from the first instant of the next month, UTC', () => {
    expect(isMonthComplete('2031-03', new Date('2031-03-31T23:59:59.999Z'))).toBe(false);
    expect(isMonthComplete('2031-03', new Date('2031-04-01T00:00:00.000Z'))).toBe(true);
  });
});

describe('money formatting', () => {
  it('divides by the ISO 4217 minor unit of the currency', () => {
    // ISO 4217: EUR has 2 decimal places, JPY has 0 (from memory of the ISO 4217 table).
    expect(formatMoney(16_580, 'eur')).toBe('€165.80');
    // The symbol text varies by locale data; the digits must show no decimals.
    expect(formatMoney(1_234, 'jpy')).toMatch(/¥1,234$/);
  });
});
