// The scheme study's cost model and ranking, with candidate figures injected so every number can
// be checked by hand. The train rows of a real duty are compared with the single calls in
// tests/http/routes-studies.test.ts.
import { describe, expect, it } from 'vitest';
import { EngineNoSolutionError, EngineRangeError } from '../../../server/engine/errors.js';
import {
  candidateCosts,
  capitalRecoveryFactor,
  runSchemeStudy,
  type CandidateFigures,
  type SchemePrices,
} from '../../../server/engine/studies/evaporator-schemes.js';
import { expectRangeError } from '../expect-range-error.js';

describe('capitalRecoveryFactor', () => {
  it('equals i(1+i)^y/((1+i)^y − 1) computed by hand', () => {
    // Hand computation: 1.08^10 by repeated multiplication = 2.158924997…
    let g = 1;
    for (let k = 0; k < 10; k++) g *= 1.08;
    expect(g).toBeCloseTo(2.158924997, 9);
    expect(capitalRecoveryFactor(0.08, 10)).toBeCloseTo((0.08 * g) / (g - 1), 14);
    // Interest tables print (A/P, 8 %, 10) = 0.14903 (from memory, e.g. Sullivan, Engineering Economy, appendix tables).
    expect(capitalRecoveryFactor(0.08, 10)).toBeCloseTo(0.14903, 5);
    // i = 100 % over one year: pay back the capital and as much again, CRF = 1·2/(2 − 1) = 2.
    expect(capitalRecoveryFactor(1, 1)).toBeCloseTo(2, 14);
  });

  it('is 1/y at zero interest and tends to it as the interest vanishes', () => {
    expect(capitalRecoveryFactor(0, 20)).toBe(0.05);
    expect(capitalRecoveryFactor(0, 1)).toBe(1);
    // The limit i → 0: CRF ≈ 1/y + (i/2)(1 + 1/y) (series of i/(1 − (1+i)^−y)); no cancellation at tiny i.
    expect(capitalRecoveryFactor(1e-12, 20)).toBeCloseTo(0.05 + 0.5e-12 * (1 + 1 / 20), 16);
    expect(capitalRecoveryFactor(1e-6, 20)).toBeCloseTo(0.05 + 0.5e-6 * (1 + 1 / 20), 11); // second order: O(i²);
  });

  it('refuses an interest rate outside 0–1 and a life outside 1–100 years', () => {
    expectRangeError(() => capitalRecoveryFactor(-0.01, 10), { field: 'prices.interestRate' });
    expectRangeError(() => capitalRecoveryFactor(1.5, 10), { field: 'prices.interestRate' });
    expectRangeError(() => capitalRecoveryFactor(Number.NaN, 10), { field: 'prices.interestRate' });
    expectRangeError(() => capitalRecoveryFactor(0.08, 0.5), { field: 'prices.lifeYears' });
    expectRangeError(() => capitalRecoveryFactor(0.08, 101), { field: 'prices.lifeYears' });
  });
});

/** Linear scaling (exponent 1) and i = 0 over 10 years (CRF 0.1), so the sums are easy by hand. */
const prices: SchemePrices = {
  steamPrice: 20,
  electricityPrice: 0.1,
  operatingHoursPerYear: 8000,
  bodyCost: { reference: 100_000, referenceSize: 100, exponent: 1 },
  compressorCost: { reference: 1_000_000, referenceSize: 1e6, exponent: 1 },
  interestRate: 0,
  lifeYears: 10,
};

function figures(f: Partial<CandidateFigures>): CandidateFigures {
  return {
    steamMassFlow: 0,
    electricPower: 0,
    shaftPower: 0,
    totalArea: 0,
    bodies: 0,
    compressors: 0,
    evaporation: 2,
    warnings: [],
    ...f,
  };
}

/** An invented train: steam 1/n kg/s, 100 m² per body. TAC(n) = 576 000/n + 10 000·n. */
const train = (n: number) => figures({ steamMassFlow: 1 / n, totalArea: 100 * n, bodies: n });
/** An invented MVR: 0.01 kg/s make-up, 120 kW electric, 90 kW shaft, one body of 300 m². */
const mvr = () =>
  figures({
    steamMassFlow: 0.01,
    electricPower: 120e3,
    shaftPower: 90e3,
    totalArea: 300,
    bodies: 1,
    compressors: 1,
  });

describe('candidateCosts', () => {
  it('prices steam by the tonne, power by the kWh and scales each body and compressor', () => {
    const c = candidateCosts(mvr(), prices);
    // 0.01 kg/s = 0.036 t/h × 20 = 0.72 per hour; 120 kW × 0.1 = 12 per hour; × 8000 h.
    expect(c.annualEnergyCost).toBeCloseTo((0.72 + 12) * 8000, 6);
    // body 100 000·(300/100)^1 + compressor 1e6·(90 kW/1000 kW)^1
    expect(c.installedCost).toBeCloseTo(300_000 + 90_000, 6);
    expect(c.capitalRecoveryFactor).toBe(0.1);
    expect(c.capitalCharge).toBeCloseTo(39_000, 6);
    expect(c.totalAnnualCost).toBeCloseTo(140_760, 6);
  });

  it('costs equal bodies one by one with the power law (not the total area at once)', () => {
    const p = { ...prices, bodyCost: { reference: 100_000, referenceSize: 100, exponent: 0.6 } };
    // 4 bodies of 50 m²: 4 × 100 000 × 0.5^0.6; one body of 200 m² would be 100 000 × 2^0.6.
    const c = candidateCosts(figures({ totalArea: 200, bodies: 4 }), p);
    expect(c.installedCost).toBeCloseTo(4 * 100_000 * Math.pow(0.5, 0.6), 6);
    expect(c.annualEnergyCost).toBe(0);
  });
});

describe('runSchemeStudy', () => {
  const duty = { maxEffects: 8, mvr: true, tvr: false };

  it('ranks by total annual cost and lists the trains, then MVR', () => {
    const s = runSchemeStudy(duty, prices, { train, mvr });
    expect(s.candidates.map((c) => `${c.scheme}:${c.effects}`)).toEqual([
      ...[1, 2, 3, 4, 5, 6, 7, 8].map((n) => `multiple-effect:${n}`),
      'mechanical-vapor-recompression:1',
    ]);
    // By hand: TAC(n) = 576 000/n + 10 000·n → 8 effects 152 000 is the best train (7: 152 285.7);
    // MVR 140 760 beats it.
    expect(s.candidates[7]!.costs!.totalAnnualCost).toBeCloseTo(152_000, 6);
    expect(s.candidates[6]!.costs!.totalAnnualCost).toBeCloseTo(576_000 / 7 + 70_000, 6);
    expect(s.cheapest).toBe(8);
    expect(s.candidates[0]!.steamEconomy).toBeCloseTo(2, 12);
  });

  it('says which candidate wins when each price moves ±30 % (switches worked by hand)', () => {
    const s = runSchemeStudy(duty, prices, { train, mvr });
    const at = (price: string, change: number) =>
      s.sensitivity.find((r) => r.price === price && r.change === change)!;
    expect(s.sensitivity).toHaveLength(8);
    // Steam −30 %: trains 403 200/n + 10 000 n → 6 effects 127 200 (7: 127 600); MVR 139 032.
    expect(at('steamPrice', -0.3).cheapest).toBe(5);
    expect(at('steamPrice', -0.3).totalAnnualCost).toBeCloseTo(127_200, 6);
    // Steam +30 %: MVR 142 488 against 173 600 for 8 effects.
    expect(at('steamPrice', 0.3).cheapest).toBe(8);
    // Electricity +30 %: MVR (0.72 + 15.6)·8000 + 39 000 = 169 560 > 152 000 → 8 effects.
    expect(at('electricityPrice', 0.3).cheapest).toBe(7);
    expect(at('electricityPrice', 0.3).totalAnnualCost).toBeCloseTo(152_000, 6);
    expect(at('electricityPrice', -0.3).cheapest).toBe(8);
    // Bodies −30 %: 8 effects 72 000 + 56 000 = 128 000 < MVR 131 760.
    expect(at('bodyCost.reference', -0.3).cheapest).toBe(7);
    expect(at('bodyCost.reference', -0.3).totalAnnualCost).toBeCloseTo(128_000, 6);
    expect(at('bodyCost.reference', 0.3).cheapest).toBe(8);
    // Compressor ±30 %: MVR 138 060 / 143 460, still below every train.
    expect(at('compressorCost.reference', -0.3).totalAnnualCost).toBeCloseTo(138_060, 6);
    expect(at('compressorCost.reference', 0.3).cheapest).toBe(8);
  });

  it('lists a candidate whose calculation fails as infeasible with its error, and ranks the rest', () => {
    const tooFew = new EngineNoSolutionError('no temperature difference left');
    const s = runSchemeStudy({ maxEffects: 4, mvr: false, tvr: false }, prices, {
      train: (n) => {
        if (n > 2) throw tooFew;
        return train(n);
      },
    });
    expect(s.candidates.map((c) => c.feasible)).toEqual([true, true, false, false]);
    expect(s.candidates[2]!.error).toBe(tooFew);
    expect(s.candidates[2]!.costs).toBeUndefined();
    expect(s.cheapest).toBe(1);
    expect(s.sensitivity.every((r) => r.cheapest === 1)).toBe(true);
  });

  it('lists asked-for schemes without an evaluator as unavailable, never with figures', () => {
    const s = runSchemeStudy({ maxEffects: 2, mvr: true, tvr: true }, prices, { train });
    const rest = s.candidates.slice(2);
    expect(rest.map((c) => `${c.scheme}:${c.effects}`)).toEqual([
      'mechanical-vapor-recompression:1',
      'thermal-vapor-recompression:1',
      'thermal-vapor-recompression:2',
    ]);
    for (const c of rest) {
      expect(c).toMatchObject({ feasible: false, unavailable: true });
      expect(c.figures).toBeUndefined();
    }
  });

  it('runs a TVR evaluator once per train size when one is given', () => {
    const seen: number[] = [];
    const s = runSchemeStudy({ maxEffects: 3, mvr: false, tvr: true }, prices, {
      train,
      tvr: (n) => {
        seen.push(n);
        return figures({ steamMassFlow: 0.6 / n, totalArea: 100 * n, bodies: n });
      },
    });
    expect(seen).toEqual([1, 2, 3]);
    // TVR on 3 effects: 0.2 kg/s → 0.72 t/h × 20 × 8000 = 115 200 + 30 000.
    expect(s.candidates[5]!.costs!.totalAnnualCost).toBeCloseTo(145_200, 6);
    expect(s.cheapest).toBe(5);
  });

  it('refuses the study with the single effect’s error when no candidate is feasible', () => {
    const first = new EngineRangeError('feed.massFraction', 0.9, { min: 0, max: 0.6, unit: 'kg/kg' });
    expect(() =>
      runSchemeStudy({ maxEffects: 3, mvr: true, tvr: false }, prices, {
        train: () => {
          throw first;
        },
      }),
    ).toThrow(first);
  });

  it('lets an error that is not an engine error through (a defect, never a reason)', () => {
    expect(() =>
      runSchemeStudy({ maxEffects: 2, mvr: false, tvr: false }, prices, {
        train: () => {
          throw new TypeError('bug');
        },
      }),
    ).toThrow(TypeError);
  });

  it('treats a non-finite figure from an evaluator as no solution, not as a cost', () => {
    const s = runSchemeStudy({ maxEffects: 2, mvr: false, tvr: false }, prices, {
      train: (n) => (n === 2 ? figures({ steamMassFlow: Number.NaN }) : train(n)),
    });
    expect(s.candidates[1]!.feasible).toBe(false);
    expect(s.candidates[1]!.error).toBeInstanceOf(EngineNoSolutionError);
  });

  it('breaks a tie in favour of the candidate listed first', () => {
    const s = runSchemeStudy(
      { maxEffects: 3, mvr: false, tvr: false },
      { ...prices, steamPrice: 0, bodyCost: { ...prices.bodyCost, reference: 0 } },
      { train },
    );
    expect(s.candidates.every((c) => c.costs!.totalAnnualCost === 0)).toBe(true);
    expect(s.cheapest).toBe(0);
  });

  it('refuses prices out of range with the field', () => {
    const run = (p: SchemePrices) => () =>
      runSchemeStudy({ maxEffects: 1, mvr: false, tvr: false }, p, { train });
    expectRangeError(run({ ...prices, operatingHoursPerYear: 9000 }), {
      field: 'prices.operatingHoursPerYear',
    });
    expectRangeError(run({ ...prices, steamPrice: -1 }), { field: 'prices.steamPrice' });
    expectRangeError(run({ ...prices, bodyCost: { ...prices.bodyCost, exponent: 1.6 } }), {
      field: 'prices.bodyCost.exponent',
    });
    expectRangeError(run({ ...prices, compressorCost: { ...prices.compressorCost, referenceSize: 0 } }), {
      field: 'prices.compressorCost.referenceShaftPower',
    });
    expectRangeError(() => runSchemeStudy({ maxEffects: 11, mvr: false, tvr: false }, prices, { train }), {
      field: 'maxEffects',
    });
  });
});
