/**
 * Optional transport-property polynomials of custom liquors: density, relative viscosity (on
 * IAPWS water), thermal conductivity and surface tension, validated like the c_p polynomial and
 * checked with the same x and T ranges. The coefficients below are invented for the tests (demo
 * data), so the checks are of behaviour, not of a liquor.
 */
import { describe, expect, it } from 'vitest';
import { createCustomLiquor, CustomLiquorDefinitionError } from '../../../server/engine/liquors/custom.js';
import { liquidViscosity } from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';
import { expectRangeError } from '../expect-range-error.js';

const base = {
  name: 'Demo liquor with transport data',
  boilingPointRise: { polynomial: [0, 5] },
  heatCapacity: { polynomial: [4180, -2500] },
  validity: { massFraction: { min: 0, max: 0.5 }, temperature: { min: 300, max: 400 } },
};

describe('custom liquor transport polynomials', () => {
  const liquor = createCustomLiquor({
    ...base,
    density: { polynomial: [1000, 400] },
    viscosity: { polynomial: [1, 2, 30] },
    thermalConductivity: { polynomial: [0.6, -0.3] },
    surfaceTension: { polynomial: [0.06, 0.01] },
  });

  it('evaluates each polynomial in x, viscosity relative to IAPWS water at T', () => {
    expect(liquor.density?.(0.25, 350)).toBeCloseTo(1100, 9);
    expect(liquor.thermalConductivity?.(0.25, 350)).toBeCloseTo(0.525, 12);
    expect(liquor.surfaceTension?.(0.25, 350)).toBeCloseTo(0.0625, 12);
    expect(liquor.viscosity?.(0.2, 350)).toBeCloseTo(liquidViscosity(350) * (1 + 0.4 + 1.2), 15);
  });

  it('warns outside the stated validity and refuses beyond its margin, like the c_p polynomial', () => {
    const w: EngineWarning[] = [];
    liquor.viscosity?.(0.51, 350, w);
    expect(w.map((x) => `${x.code}:${x.field}`)).toEqual(['model-extrapolated:massFraction']);
    expectRangeError(() => liquor.thermalConductivity?.(0.6, 350), { field: 'massFraction' });
    expectRangeError(() => liquor.density?.(0.3, 450), { field: 'temperature' });
  });

  it('leaves a property out when its polynomial is not given', () => {
    const plain = createCustomLiquor(base);
    expect(plain.viscosity).toBeUndefined();
    expect(plain.thermalConductivity).toBeUndefined();
    expect(plain.surfaceTension).toBeUndefined();
    expect(plain.density).toBeUndefined();
  });

  it('refuses a polynomial that turns negative over the range, naming its field', () => {
    let caught: unknown;
    try {
      createCustomLiquor({ ...base, thermalConductivity: { polynomial: [0.6, -2] } });
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(CustomLiquorDefinitionError);
    expect((caught as CustomLiquorDefinitionError).field).toBe('thermalConductivity.polynomial');
  });

  it('refuses a non-finite coefficient and a polynomial of degree above 8', () => {
    expect(() => createCustomLiquor({ ...base, density: { polynomial: [Number.NaN] } })).toThrow(
      CustomLiquorDefinitionError,
    );
    expect(() => createCustomLiquor({ ...base, viscosity: { polynomial: Array(10).fill(1) } })).toThrow(
      CustomLiquorDefinitionError,
    );
  });
});
