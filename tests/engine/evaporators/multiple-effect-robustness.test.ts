/**
 * Robustness of the multiple-effect solver over randomly generated trains (fast-check): every
 * case either converges from the default starting guess with closed balances and finite numbers,
 * or throws one of the engine's typed errors. Property-free checks: conservation of mass, solute
 * and energy, and the equal-area condition, need no reference data.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../../../server/engine/errors.js';
import {
  solveMultipleEffect,
  type FeedArrangement,
} from '../../../server/engine/evaporators/multiple-effect.js';
import { createCustomLiquor } from '../../../server/engine/liquors/custom.js';

const C = 273.15;
// Geankoplis (4th ed.) Example 8.5-1 liquor: BPR = 1.78x + 6.22x² K, c_p = 4.19 − 2.35x kJ/(kg·K)
const liquor = createCustomLiquor({
  name: 'robustness sugar-like',
  boilingPointRise: { polynomial: [0, 1.78, 6.22] },
  heatCapacity: { polynomial: [4190, -2350] },
  validity: { massFraction: { min: 0, max: 0.8 } },
});

const arrangement = (n: number): fc.Arbitrary<FeedArrangement> =>
  fc.oneof(
    fc.constant<FeedArrangement>('forward'),
    fc.constant<FeedArrangement>('backward'),
    fc.constant<FeedArrangement>('parallel'),
    fc
      .shuffledSubarray(
        Array.from({ length: n }, (_, i) => i + 1),
        { minLength: n, maxLength: n },
      )
      .map((a) => a as FeedArrangement),
  );

const train = fc.integer({ min: 1, max: 8 }).chain((n) =>
  fc.record({
    n: fc.constant(n),
    u: fc.array(fc.double({ min: 500, max: 4000, noNaN: true }), { minLength: n, maxLength: n }),
    arrangement: arrangement(n),
    steamT: fc.double({ min: 100, max: 180, noNaN: true }),
    // last-effect pressure, Pa: IF97 saturation pressures at 40, 50, 60, 70 °C (from memory; any
    // value in range would do, these are just realistic condensers)
    lastP: fc.constantFrom(7.384e3, 12.352e3, 19.946e3, 31.201e3),
    xF: fc.double({ min: 0.02, max: 0.2, noNaN: true }),
    ratio: fc.double({ min: 1.5, max: 4, noNaN: true }),
    feedT: fc.double({ min: 15, max: 90, noNaN: true }),
    flash: fc.boolean(),
  }),
);

describe('multiple-effect solver robustness', () => {
  it('converges with closed balances, rates back to the design, or throws a typed error for random trains', () => {
    let solved = 0;
    let refused = 0;
    fc.assert(
      fc.property(train, (t) => {
        try {
          const r = solveMultipleEffect({
            mode: 'equal-area',
            liquor,
            feed: { massFlow: 5, massFraction: t.xF, temperature: t.feedT + C },
            productMassFraction: Math.min(0.75, t.xF * t.ratio),
            steam: { saturationTemperature: t.steamT + C },
            lastEffectPressure: t.lastP,
            overallHeatTransferCoefficients: t.u,
            feedArrangement: t.arrangement,
            condensateFlash: t.flash,
          });
          expect(r.residual).toBeLessThan(1e-9);
          expect(r.balances.energy).toBeLessThan(1e-9);
          expect(r.balances.mass).toBeLessThan(1e-9);
          for (const e of r.effects) {
            expect(Math.abs(e.area - r.area) / r.area).toBeLessThan(1e-6);
            expect(e.temperatureDifference).toBeGreaterThan(0);
            expect(e.vaporFlow).toBeGreaterThanOrEqual(0);
          }
          expect(Number.isFinite(r.steam.massFlow)).toBe(true);
          // rating the designed areas must give the design back (same equations, other unknowns)
          const rated = solveMultipleEffect({
            mode: 'given-areas',
            liquor,
            feed: { massFlow: 5, massFraction: t.xF, temperature: t.feedT + C },
            steam: { saturationTemperature: t.steamT + C },
            lastEffectPressure: t.lastP,
            overallHeatTransferCoefficients: t.u,
            areas: r.effects.map((e) => e.area),
            feedArrangement: t.arrangement,
            condensateFlash: t.flash,
          });
          expect(Math.abs(rated.steam.massFlow / r.steam.massFlow - 1)).toBeLessThan(1e-6);
          expect(Math.abs(rated.product.massFraction - r.product.massFraction)).toBeLessThan(1e-6);
          solved++;
        } catch (e) {
          refused++;
          expect(
            e instanceof EngineNoSolutionError ||
              e instanceof EngineRangeError ||
              e instanceof EngineInputError,
          ).toBe(true);
          if (e instanceof EngineNoSolutionError) expect(e.detail.reason).not.toBe('not-converged');
        }
      }),
      { numRuns: 300, seed: 20260 },
    );
    // most random trains are physical: the check must not pass by refusing everything
    expect(solved).toBeGreaterThan(2 * refused);
  });
});
