/**
 * defineLiquorModel: the default boiling-point rise, and a model's own rise left alone.
 */
import { describe, expect, it } from 'vitest';
import { defineLiquorModel, type LiquorModel } from '../../../server/engine/liquors/model.js';
import { kraftBlackLiquor } from '../../../server/engine/liquors/kraft-black-liquor.js';

const base: Omit<LiquorModel, 'boilingPoint' | 'boilingPointRise'> = {
  id: 'test-liquor',
  name: 'test liquor',
  kind: 'custom',
  compositionVariable: 'mass fraction',
  validity: { massFraction: { min: 0, max: 0.5 }, temperature: { min: 273.15, max: 473.15 } },
  limits: { massFraction: { min: 0, max: 0.5 }, temperature: { min: 273.15, max: 473.15 } },
  sources: [],
  cautions: [],
  enthalpy: () => 0,
};

describe('defineLiquorModel', () => {
  it('supplies the rise as the boiling point less the water saturation temperature at the pressure', () => {
    // boiling point 2 K above water at one standard atmosphere, where water boils at 373.124 K
    // (IAPWS R7-97(2012) eq. 31 at 0.101325 MPa: 373.1243 K, from memory)
    const model = defineLiquorModel({ ...base, boilingPoint: () => 373.1243 + 2 });
    expect(model.boilingPointRise(0.1, 101_325)).toBeCloseTo(2, 3);
  });

  it('passes the warning sink to the boiling point it subtracts from', () => {
    const seen: unknown[] = [];
    const model = defineLiquorModel({
      ...base,
      boilingPoint: (_x, _p, w) => {
        seen.push(w);
        return 380;
      },
    });
    const sink: never[] = [];
    model.boilingPointRise(0.1, 101_325, sink);
    expect(seen).toEqual([sink]);
    expect(seen[0]).toBe(sink);
  });

  it("keeps a model's own rise when the definition gives one", () => {
    const own = (): number => 7;
    const model = defineLiquorModel({ ...base, boilingPoint: () => 400, boilingPointRise: own });
    expect(model.boilingPointRise).toBe(own);
    expect(model.boilingPointRise(0.1, 101_325)).toBe(7);
  });

  it('leaves kraft black liquor with the rise its correlation gives (zero for no solids)', () => {
    // Frederick (1997): the rise vanishes with the solids
    expect(kraftBlackLiquor.boilingPointRise(0, 101_325)).toBe(0);
  });
});
