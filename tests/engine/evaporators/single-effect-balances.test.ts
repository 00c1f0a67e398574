/**
 * Balance closure and design/rating inversion over many random cases (fast-check). The balances
 * are recomputed here from the result's streams alone (F = L + V; F·x_F = L·x_L;
 * S·h_in + F·h_F = S·h_out + V·H_V + L·h_L + losses: the textbook balances of Geankoplis, 4th ed.,
 * section 8.4), independently of the solver's own residuals.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  designSingleEffect,
  rateSingleEffect,
  type SingleEffectDesignInput,
  type SingleEffectResult,
} from '../../../server/engine/evaporators/single-effect.js';
import { invariantLiquor } from './single-effect-test-liquors.js';

function independentResiduals(r: SingleEffectResult) {
  const F = r.feed.massFlow;
  const L = r.product.massFlow;
  const V = r.vapor.massFlow;
  const S = r.steam.massFlow;
  const energyIn = S * r.steam.enthalpyIn + F * r.feed.enthalpy;
  const energyOut = S * r.steam.enthalpyOut + V * r.vapor.enthalpy + L * r.product.enthalpy + r.heatLoss;
  return {
    mass: Math.abs(F - L - V) / F,
    solute: Math.abs(F * r.feed.massFraction - L * r.product.massFraction) / (F * r.feed.massFraction),
    energy: Math.abs(energyIn - energyOut) / Math.max(Math.abs(energyIn), Math.abs(energyOut)),
    // A = Q/(U·ΔT) with Q = S·(h_in − h_out) and Q·(1 − f) = the liquor's gain
    area:
      Math.abs(r.area * r.body.overallHeatTransferCoefficient * r.temperatureDifference - r.duty) / r.duty,
    loss: Math.abs(r.heatLoss - r.heatLossFraction * S * (r.steam.enthalpyIn - r.steam.enthalpyOut)) / r.duty,
  };
}

const caseArb = fc.record({
  F: fc.double({ min: 0.05, max: 50, noNaN: true }),
  xF: fc.double({ min: 0.005, max: 0.1, noNaN: true }),
  ratio: fc.double({ min: 1.2, max: 2.8, noNaN: true }),
  TF: fc.double({ min: 285, max: 340, noNaN: true }),
  pBody: fc.double({ min: 8e3, max: 150e3, noNaN: true }),
  dTsteam: fc.double({ min: 15, max: 60, noNaN: true }),
  superheat: fc.double({ min: 0, max: 40, noNaN: true }),
  subcool: fc.double({ min: 0, max: 20, noNaN: true }),
  U: fc.double({ min: 300, max: 4000, noNaN: true }),
  H: fc.double({ min: 0, max: 4, noNaN: true }),
  f: fc.double({ min: 0, max: 0.1, noNaN: true }),
});

type Case = typeof caseArb extends fc.Arbitrary<infer T> ? T : never;

function inputOf(c: Case): SingleEffectDesignInput {
  // steam condensing dTsteam above the water boiling point at the body pressure (≥ 15 K: above any BPR here)
  const tb = 273.15 + 100 * Math.pow(c.pBody / 101325, 0.25); // rough guess of T_sat, only to place the steam
  return {
    liquor: invariantLiquor,
    feed: { massFlow: c.F, massFraction: c.xF, temperature: c.TF },
    product: { massFraction: Math.min(0.28, c.xF * c.ratio) },
    steam: { saturationTemperature: tb + c.dTsteam, superheat: c.superheat, condensateSubcooling: c.subcool },
    body: { pressure: c.pBody, overallHeatTransferCoefficient: c.U, liquidHeight: c.H },
    heatLossFraction: c.f,
  };
}

describe('single-effect balances', () => {
  it('close mass, solute and energy to 1e-9 relative in every design, recomputed from the streams', () => {
    let solved = 0;
    fc.assert(
      fc.property(caseArb, (c) => {
        const input = inputOf(c);
        let r: SingleEffectResult;
        try {
          r = designSingleEffect(input);
        } catch (e) {
          // a random case may be physically impossible; that must be a typed engine error
          expect((e as Error).name).toMatch(/^Engine/);
          return;
        }
        solved++;
        const res = independentResiduals(r);
        expect(res.mass).toBeLessThan(1e-9);
        expect(res.solute).toBeLessThan(1e-9);
        expect(res.energy).toBeLessThan(1e-9);
        expect(res.area).toBeLessThan(1e-9);
        expect(res.loss).toBeLessThan(1e-9);
        expect(r.balances.mass).toBeLessThan(1e-9);
        expect(r.balances.solute).toBeLessThan(1e-9);
        expect(r.balances.energy).toBeLessThan(1e-9);
        // ΔT includes the BPR (domain.md §1.5): never the water boiling point
        expect(r.temperatureDifference).toBeLessThan(r.steam.temperature - r.waterBoilingPoint);
      }),
      { numRuns: 300, seed: 20240611 },
    );
    // the generator places the steam well above the liquor's boiling point: nearly all cases solve
    expect(solved).toBeGreaterThan(250);
  });

  it('rating with the designed area returns the designed product to 1e-6 and closes its balances', () => {
    let rated = 0;
    fc.assert(
      fc.property(caseArb, (c) => {
        const input = inputOf(c);
        let d: SingleEffectResult;
        try {
          d = designSingleEffect(input);
        } catch {
          return;
        }
        const { product: _p, ...rest } = input;
        const r = rateSingleEffect({ ...rest, body: { ...input.body, area: d.area } });
        expect(Math.abs(r.product.massFraction - d.product.massFraction)).toBeLessThan(1e-6);
        const res = independentResiduals(r);
        expect(res.mass).toBeLessThan(1e-9);
        expect(res.solute).toBeLessThan(1e-9);
        expect(res.energy).toBeLessThan(1e-9);
        const byProduct = rateSingleEffect({
          ...rest,
          feed: { massFraction: c.xF, temperature: c.TF },
          product: { massFraction: d.product.massFraction },
          body: { ...input.body, area: d.area },
        });
        expect(Math.abs(byProduct.feed.massFlow - c.F) / c.F).toBeLessThan(1e-9);
        rated++;
      }),
      { numRuns: 100, seed: 7 },
    );
    expect(rated).toBeGreaterThan(80);
  });
});
