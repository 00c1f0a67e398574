// The accounts form warns when a monthly quota is below the units the plan includes.
// Source: server/billing/plans.ts (Starter includes 10 000 units; invented prices otherwise).
import { describe, expect, it } from 'vitest';
import { quotaBelowIncludedWarning } from '../../console/src/composables/quota.js';

const starter = { displayName: 'Starter', includedUnits: 10_000 };

describe('quota below the plan’s included units', () => {
  it('warns about a 5 000-unit quota on a plan that includes 10 000, naming both', () => {
    const text = quotaBelowIncludedWarning(5000, starter);
    expect(text).toContain(new Intl.NumberFormat().format(5000));
    expect(text).toContain(new Intl.NumberFormat().format(10_000));
    expect(text).toContain('Starter');
  });

  it('says nothing for a quota at or above the included units, an empty field or an unknown plan', () => {
    expect(quotaBelowIncludedWarning(10_000, starter)).toBeUndefined();
    expect(quotaBelowIncludedWarning('250000', starter)).toBeUndefined();
    expect(quotaBelowIncludedWarning('', starter)).toBeUndefined();
    expect(quotaBelowIncludedWarning(5000, undefined)).toBeUndefined();
  });
});
