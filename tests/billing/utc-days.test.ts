// utcDay / utcMonth (server/accounts/usage.ts) reuse the strings of the last day asked for; they
// must agree with Date.prototype.toISOString (ECMA-262 §21.4.4.36, UTC, "YYYY-MM-DDTHH:mm:ss.sssZ")
// for every time, in any order, across day, month and year boundaries.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { utcDay, utcMonth } from '../../server/accounts/usage.js';

const iso = (t: number) => new Date(t).toISOString();

describe('utcDay and utcMonth', () => {
  it('agree with toISOString for random times in random order (1970–2100)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -86_400_000, max: 4_102_444_800_000 }), { maxLength: 50 }),
        (times) => {
          for (const t of times) {
            expect(utcDay(new Date(t))).toBe(iso(t).slice(0, 10));
            expect(utcMonth(new Date(t))).toBe(iso(t).slice(0, 7));
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  it('changes exactly at midnight UTC, including a month and a year end', () => {
    const midnight = Date.UTC(2031, 11, 31, 0, 0, 0); // 2031-12-31T00:00:00Z
    const next = midnight + 86_400_000; // 2032-01-01T00:00:00Z
    expect(utcDay(new Date(midnight - 1))).toBe('2031-12-30');
    expect(utcDay(new Date(midnight))).toBe('2031-12-31');
    expect(utcDay(new Date(next - 1))).toBe('2031-12-31');
    expect(utcMonth(new Date(next - 1))).toBe('2031-12');
    expect(utcDay(new Date(next))).toBe('2032-01-01');
    expect(utcMonth(new Date(next))).toBe('2032-01');
    expect(utcDay(new Date(midnight - 1))).toBe('2031-12-30'); // going back a day
  });

  it('throws for an invalid date, as toISOString does', () => {
    expect(() => utcDay(new Date(Number.NaN))).toThrow(RangeError);
  });
});
