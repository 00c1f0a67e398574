/**
 * A train whose balances need a negative flow must be refused with a typed error, whichever way the
 * iteration meets that boundary: by a step that cannot be made physical, or by damped steps that
 * stand still against it (no change, equations unmet). The second used to be returned as a
 * "converged" result with a 10 % energy imbalance.
 */
import { describe, expect, it } from 'vitest';
import { EngineNoSolutionError } from '../../../server/engine/errors.js';
import { solveMultipleEffect } from '../../../server/engine/evaporators/multiple-effect.js';
import { createCustomLiquor } from '../../../server/engine/liquors/custom.js';

const C = 273.15;
// Geankoplis (4th ed.) Example 8.5-1 liquor: BPR = 1.78x + 6.22x² K, c_p = 4.19 − 2.35x kJ/(kg·K)
const liquor = createCustomLiquor({
  name: 'stall sugar-like',
  boilingPointRise: { polynomial: [0, 1.78, 6.22] },
  heatCapacity: { polynomial: [4190, -2350] },
  validity: { massFraction: { min: 0, max: 0.8 } },
});

describe('multiple-effect refusal at the negative-flow boundary', () => {
  it('refuses a 7-effect backward-feed train with an 18 °C feed and little evaporation as negative-flow', () => {
    // The counterexample of tests/engine/evaporators/multiple-effect-robustness.test.ts (seed
    // 20260): 8.8 % → 13.2 %, steam at 109.8 °C, last effect at 7.4 kPa, condensate flash on.
    // Too little evaporation per effect to heat the cold feed up the train: no physical solution.
    let caught: unknown;
    try {
      solveMultipleEffect({
        mode: 'equal-area',
        liquor,
        feed: { massFlow: 5, massFraction: 0.08772336557758073, temperature: 18.069751124184535 + C },
        productMassFraction: 0.08772336557758073 * 1.5000000000000033,
        steam: { saturationTemperature: 109.81250800672748 + C },
        lastEffectPressure: 7384,
        overallHeatTransferCoefficients: [
          1821.9044380143612, 917.9751520222079, 3615.624946789749, 2898.3122898951806, 1761.1170739843822,
          500, 1006.547641864234,
        ],
        feedArrangement: 'backward',
        condensateFlash: true,
      });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(EngineNoSolutionError);
    expect((caught as EngineNoSolutionError).detail.reason).toBe('negative-flow');
  });
});
