/**
 * Regression guard: trains solved without the thermocompressor or figures-of-merit options give
 * exactly (bit for bit) the results they gave before those options existed. The fixture is the
 * engine's own earlier output (tests/fixtures/evaporators/make-multiple-effect-baseline.ts), not
 * an outside source; the outside checks live in multiple-effect.test.ts.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { solveMultipleEffect } from '../../../server/engine/evaporators/multiple-effect.js';
import { baselineCases } from '../../fixtures/evaporators/multiple-effect-baseline-cases.js';

const baseline = JSON.parse(
  readFileSync(new URL('../../fixtures/evaporators/multiple-effect-baseline.json', import.meta.url), 'utf8'),
) as Record<string, Record<string, unknown>>;

describe('Trains without the new options', () => {
  it.each(Object.entries(baselineCases()))('%s gives bit-identical results to before', (name, input) => {
    const r = solveMultipleEffect(input) as unknown as Record<string, unknown>;
    const expected = baseline[name]!;
    for (const key of Object.keys(expected)) {
      // JSON keeps every finite double exactly, so equality here is equality of the bits
      expect(JSON.parse(JSON.stringify(r[key])), `${name}.${key}`).toEqual(expected[key]);
    }
  });
});
