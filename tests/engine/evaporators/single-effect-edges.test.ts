/**
 * Single-effect edges: the liquid head of a liquor without a density model, a pure-water feed,
 * a solubility correlation narrower than the boiling-point model, and the heating-side warnings.
 * Each check states where its expected value comes from.
 */
import { describe, expect, it } from 'vitest';
import {
  designSingleEffect,
  rateSingleEffect,
  type SingleEffectDesignInput,
} from '../../../server/engine/evaporators/single-effect.js';
import { EngineInputError } from '../../../server/engine/errors.js';
import { createCustomLiquor } from '../../../server/engine/liquors/custom.js';
import type { LiquorModel } from '../../../server/engine/liquors/model.js';
import { sodiumHydroxide } from '../../../server/engine/liquors/sodium-hydroxide.js';
import { sucrose } from '../../../server/engine/liquors/sucrose.js';
import { saturatedLiquidEnthalpy, saturatedVaporEnthalpy } from '../../../server/engine/steam/if97.js';

const G = 9.80665; // standard gravity, CGPM 1901 (exact)
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

/** The NaOH model with its density taken away: a liquor without a density model. */
const causticWithoutDensity: LiquorModel = { ...sodiumHydroxide, density: undefined };

/** 10 % NaOH at 56.85 °C, 10 kg/s; steam 500 kPa; body 77 kPa; U = 1500 W/(m²·K); head 2 m. */
const caustic = (x: number, liquor: LiquorModel = causticWithoutDensity): SingleEffectDesignInput => ({
  liquor,
  feed: { massFlow: 10, massFraction: 0.1, temperature: 330 },
  product: { massFraction: x },
  steam: { pressure: 500e3 },
  body: { pressure: 77e3, overallHeatTransferCoefficient: 1500, liquidHeight: 2 },
});

describe('liquid head of a liquor without a density model', () => {
  it('keeps the area continuous across product 0.2003 → 0.2004 (no drop to a vapour density)', () => {
    const a = designSingleEffect(caustic(0.2003));
    const b = designSingleEffect(caustic(0.2004));
    // A 1e-4 step in x moves the area by about 0.1 m² (the slope of the neighbouring steps);
    // the old vapour-density head made it jump by 11 m².
    expect(Math.abs(b.area - a.area)).toBeLessThan(0.5);
    // Sweep: every step of 1e-5 changes the area by a similar, small amount.
    const areas: number[] = [];
    for (let k = 0; k <= 20; k++) areas.push(designSingleEffect(caustic(0.2 + k * 1e-5)).area);
    const steps = areas.slice(1).map((v, i) => Math.abs(v - (areas[i] as number)));
    expect(Math.max(...steps)).toBeLessThan(0.05);
  });

  it('takes the head from saturated liquid water at the boiling temperature', () => {
    const r = designSingleEffect(caustic(0.2003));
    const rho = (2 * (r.body.meanBoilingPressure - r.body.pressure)) / (G * 2);
    // Saturated liquid water at 100 °C: 958.35 kg/m³ (IAPWS-IF97 steam tables, from memory);
    // the liquor surface boils here near 100.3 °C, so the density is within 1 kg/m³ of it.
    expect(Math.abs(rho - 958.35)).toBeLessThan(1);
    expect(r.warnings.find((w) => w.code === 'density-assumed-water')?.message).toMatch(/958\.\d kg\/m³/);
  });

  it('takes the head from the liquor’s own density once the model gives one (NaOH, Laliberté)', () => {
    const r = designSingleEffect(caustic(0.2003, sodiumHydroxide));
    const rho = (2 * (r.body.meanBoilingPressure - r.body.pressure)) / (G * 2);
    // The model’s density at the surface boiling point (1168 kg/m³ for 20 % NaOH at 100.3 °C, near
    // 100 °C; handbook tables give about 1219 kg/m³ at 20 °C, from memory).
    const expected = sodiumHydroxide.density?.(0.2003, r.product.temperature) as number;
    expect(rel(rho, expected)).toBeLessThan(1e-3);
    expect(r.warnings.some((w) => w.code === 'density-assumed-water')).toBe(false);
  });

  it('rates a custom polynomial liquor with a head at the area it was designed for', () => {
    // A BPR polynomial with no density: the head uses water. Design → rating must round-trip.
    const liquor = createCustomLiquor({
      name: 'Polynomial liquor without density',
      boilingPointRise: { polynomial: [0, 4, 20] },
      heatCapacity: { polynomial: [4180, -2500] },
      validity: { massFraction: { min: 0, max: 0.6 } },
    });
    const design: SingleEffectDesignInput = {
      liquor,
      feed: { massFlow: 4, massFraction: 0.08, temperature: 320 },
      product: { massFraction: 0.35 },
      steam: { pressure: 300e3 },
      body: { pressure: 25e3, overallHeatTransferCoefficient: 1700, liquidHeight: 2.5 },
    };
    const d = designSingleEffect(design);
    const { product: _omit, ...rest } = design;
    const byFeed = rateSingleEffect({ ...rest, body: { ...design.body, area: d.area } });
    expect(rel(byFeed.area, d.area)).toBeLessThan(1e-9);
    expect(Math.abs(byFeed.product.massFraction - 0.35)).toBeLessThan(1e-8);
    const byProduct = rateSingleEffect({
      ...rest,
      feed: { massFraction: 0.08, temperature: 320 },
      product: { massFraction: 0.35 },
      body: { ...design.body, area: d.area },
    });
    expect(rel(byProduct.area, d.area)).toBeLessThan(1e-9);
    expect(rel(byProduct.feed.massFlow, 4)).toBeLessThan(1e-9);
  });
});

describe('liquid head: design → rating round trip where the old lookup failed', () => {
  it('rates a BPR = 10·x liquor at 20 kPa back to the product it was designed for (x = 0.1)', () => {
    // At 20 kPa and a 1 K rise the (p_sat(T), T) lookup landed on the vapour side, so the
    // design lost its head while every rating iterate kept it. Saturated liquid has no such seam.
    const liquor = createCustomLiquor({
      name: 'Linear-BPR liquor without density',
      boilingPointRise: { polynomial: [0, 10] },
      heatCapacity: { polynomial: [4180, -2000] },
      validity: { massFraction: { min: 0, max: 0.5 } },
    });
    const design: SingleEffectDesignInput = {
      liquor,
      feed: { massFlow: 3, massFraction: 0.05, temperature: 320 },
      product: { massFraction: 0.1 },
      steam: { pressure: 200e3 },
      body: { pressure: 20e3, overallHeatTransferCoefficient: 1500, liquidHeight: 2 },
    };
    const d = designSingleEffect(design);
    // Hydrostatics (common practice): p_mid − p = ρ·g·H/2 with ρ of liquid water, ≈ 970 kg/m³.
    expect((d.body.meanBoilingPressure - 20e3) / (G * 1)).toBeGreaterThan(900);
    const { product: _omit, ...rest } = design;
    const r = rateSingleEffect({ ...rest, body: { ...design.body, area: d.area } });
    expect(Math.abs(r.product.massFraction - 0.1)).toBeLessThan(1e-8);
    expect(rel(r.area, d.area)).toBeLessThan(1e-9);
  });
});

describe('pure-water feed', () => {
  const water: SingleEffectDesignInput = {
    liquor: sodiumHydroxide,
    feed: { massFlow: 10, massFraction: 0, temperature: 323.15 },
    product: { massFlow: 6 },
    steam: { pressure: 300e3 },
    body: { pressure: 30e3, overallHeatTransferCoefficient: 1500 },
  };

  it('evaporates the difference between feed and product flow (V = F − L, x = 0)', () => {
    const r = designSingleEffect(water);
    // Mass balance F = L + V (domain primer §1): 10 − 6 = 4 kg/s.
    expect(r.vapor.massFlow).toBeCloseTo(4, 12);
    expect(r.product.massFlow).toBeCloseTo(6, 12);
    expect(r.product.massFraction).toBe(0);
    expect(r.boilingPointRise).toBeCloseTo(0, 6);
    // Energy balance (domain primer §1): S·λ = V·h_g(p) + L·h_L − F·h_F, the vapour saturated
    // (no BPR) from IF97. h_L is the liquor model's at x = 0 (the Olsson fit, close to IF97's
    // saturated liquid: a few kJ/kg at most against ≈ 290 kJ/kg).
    const need = 4 * saturatedVaporEnthalpy(30e3) + 6 * r.product.enthalpy - 10 * r.feed.enthalpy;
    expect(rel(r.duty, need)).toBeLessThan(1e-9);
    expect(Math.abs(r.product.enthalpy - saturatedLiquidEnthalpy(30e3))).toBeLessThan(5e3);
    expect(Number.isFinite(r.specificSteamConsumption)).toBe(true);
    expect(r.balances.mass).toBeLessThan(1e-12);
    expect(r.balances.energy).toBeLessThan(1e-9);
  });

  it('refuses a product flow equal to the feed, naming product.massFlow', () => {
    expect(() => designSingleEffect({ ...water, product: { massFlow: 10 } })).toThrow(
      expect.objectContaining({ name: 'EngineInputError', field: 'product.massFlow' }),
    );
    expect(() => designSingleEffect({ ...water, product: { massFlow: 10 } })).toThrow(EngineInputError);
  });
});

describe('sucrose near its temperature limit', () => {
  it('designs at 200 kPa boiling near 131 °C with a warning, not a refusal, about solubility', () => {
    const r = designSingleEffect({
      liquor: sucrose,
      feed: { massFlow: 1, massFraction: 0.5, temperature: 360 },
      product: { massFraction: 0.8 },
      steam: { pressure: 600e3 },
      body: { pressure: 200e3, overallHeatTransferCoefficient: 1500 },
    });
    // The boiling-point model runs to 150 °C; the Vavrinecz solubility fit only to 130 °C.
    expect(r.product.temperature - 273.15).toBeGreaterThan(130);
    expect(r.product.temperature - 273.15).toBeLessThan(150);
    expect(r.warnings.map((w) => w.code)).toContain('solubility-not-checked');
  });
});

describe('heating-side warnings', () => {
  it('warns of steam superheated by more than 50 K and of a ΔT above 60 K', () => {
    const base: SingleEffectDesignInput = {
      liquor: sodiumHydroxide,
      feed: { massFlow: 2, massFraction: 0.1, temperature: 330 },
      product: { massFraction: 0.2 },
      steam: { pressure: 700e3, superheat: 80 },
      body: { pressure: 15e3, overallHeatTransferCoefficient: 1500 },
    };
    const hot = designSingleEffect(base);
    // 700 kPa steam condenses at 165 °C; 10–20 % NaOH at 15 kPa boils near 60 °C: ΔT ≈ 100 K.
    expect(hot.temperatureDifference).toBeGreaterThan(60);
    const codes = hot.warnings.map((w) => w.code);
    expect(codes).toContain('large-steam-superheat');
    expect(codes).toContain('large-temperature-difference');
    const mild = designSingleEffect({
      ...base,
      steam: { pressure: 200e3, superheat: 10 },
      body: { ...base.body, pressure: 40e3 },
    });
    expect(mild.temperatureDifference).toBeLessThan(60);
    expect(mild.warnings.map((w) => w.code)).not.toContain('large-steam-superheat');
    expect(mild.warnings.map((w) => w.code)).not.toContain('large-temperature-difference');
  });
});
