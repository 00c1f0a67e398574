import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import {
  designSingleEffect,
  rateSingleEffect,
  type SingleEffectDesignInput,
} from '../../../server/engine/evaporators/single-effect.js';
import { EngineInputError, EngineNoSolutionError, EngineRangeError } from '../../../server/engine/errors.js';
import { createCustomLiquor } from '../../../server/engine/liquors/custom.js';
import { chartReadingLiquor, invariantLiquor } from './single-effect-test-liquors.js';

/** Reference water/steam values generated offline by tests/fixtures/single-effect-iapws.py (python3-iapws). */
const iapws = JSON.parse(
  readFileSync(new URL('../../fixtures/single-effect-iapws.json', import.meta.url), 'utf8'),
) as {
  saturation: { pressure: number; temperature: number; hf: number; hg: number }[];
  states: { pressure: number; temperature: number; h: number }[];
  saturated_liquid_350: { pressure: number; density: number };
};
function sat(p: number) {
  const s = iapws.saturation.find((r) => r.pressure === p);
  if (!s) throw new Error(`no fixture for ${p} Pa`);
  return s;
}

const PER_HOUR = 1 / 3600;
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('designSingleEffect: Geankoplis (4th ed.) Example 8.4-1, salt solution, BPR neglected', () => {
  // Book data (from memory): 9072 kg/h of 1.0 wt% salt at 311.0 K to 1.5 wt%; vapour space
  // 101.325 kPa; saturated steam 143.3 kPa; U = 1704 W/(m²·K); c_p = 4.14 kJ/(kg·K).
  // Book answers (from memory): L = 6048 kg/h, V = 3024 kg/h, S = 4108 kg/h, A = 149.3 m².
  // The book reads λ from its steam table at 383.2 K and 373.2 K (rounded to 0.1 K), so
  // ±0.5 % on S and A is what its table readings justify. Liquor: a custom polynomial liquor
  // (zero BPR, c_p = 4.14 kJ/(kg·K)); see also single-effect-textbook.test.ts.
  const atm = sat(101325);
  const liquor = createCustomLiquor({
    name: 'Dilute salt solution',
    boilingPointRise: { polynomial: [0] },
    heatCapacity: { polynomial: [4140] },
    validity: { massFraction: { min: 0, max: 0.05 } },
  });
  const input: SingleEffectDesignInput = {
    liquor,
    feed: { massFlow: 9072 * PER_HOUR, massFraction: 0.01, temperature: 311.0 },
    product: { massFraction: 0.015 },
    steam: { pressure: 143.3e3 },
    body: { pressure: 101325, overallHeatTransferCoefficient: 1704 },
  };
  const r = designSingleEffect(input);

  it('splits the feed into the book’s product and vapour flows (exact mass balance)', () => {
    expect(r.product.massFlow / PER_HOUR).toBeCloseTo(6048, 6); // Geankoplis Ex. 8.4-1: L = 6048 kg/h
    expect(r.vapor.massFlow / PER_HOUR).toBeCloseTo(3024, 6); // Geankoplis Ex. 8.4-1: V = 3024 kg/h
  });
  it('needs the book’s steam flow within 0.5 %', () => {
    expect(rel(r.steam.massFlow / PER_HOUR, 4108)).toBeLessThan(0.005); // Geankoplis Ex. 8.4-1: S = 4108 kg/h
  });
  it('needs the book’s area within 0.5 %', () => {
    expect(rel(r.area, 149.3)).toBeLessThan(0.005); // Geankoplis Ex. 8.4-1: A = 149.3 m²
  });
  it('takes ΔT between the steam’s condensing point and the liquor’s boiling point', () => {
    // python3-iapws: T_sat(143.3 kPa) − T_sat(101.325 kPa); the book rounds to 383.2 − 373.2 = 10 K
    expect(r.temperatureDifference).toBeCloseTo(sat(143.3e3).temperature - atm.temperature, 6);
    // latent heat h_g − h_f at 143.3 kPa from python3-iapws (book table: 2230 kJ/kg)
    expect(rel(r.steam.latentHeat, sat(143.3e3).hg - sat(143.3e3).hf)).toBeLessThan(1e-8);
    // vapour leaves saturated when there is no BPR: h_g(101.325 kPa), python3-iapws
    expect(rel(r.vapor.enthalpy, atm.hg)).toBeLessThan(1e-8);
  });
});

describe('designSingleEffect: Geankoplis (4th ed.) Example 8.4-2 with the book’s chart readings', () => {
  // Book data (from memory): 4536 kg/h of 20 % NaOH at 60 °C to 50 %; steam saturated 172.4 kPa;
  // vapour space 11.7 kPa; U = 1560 W/(m²·K). Chart readings (Dühring and enthalpy–concentration
  // charts, from memory): boiling point 89.5 °C, h_F = 214 kJ/kg, h_L = 505 kJ/kg, H_V = 2667 kJ/kg.
  // Book answers (from memory): S = 3255 kg/h, A = 49.2 m², economy 0.836.
  // Here the liquor boils at the book's 89.5 °C (BPR = 362.65 K − T_sat(11.7 kPa) from python3-iapws)
  // and h_F, h_L are the book's chart values as overrides: the engine's chain alone is tested, and
  // only the steam table is ours, so ±0.5 % on S and A.
  const bpr = 362.65 - sat(11.7e3).temperature;
  const r = designSingleEffect({
    liquor: chartReadingLiquor('geankoplis-8-4-2-chart', bpr),
    feed: { massFlow: 4536 * PER_HOUR, massFraction: 0.2, temperature: 333.15, enthalpy: 214e3 },
    product: { massFraction: 0.5, enthalpy: 505e3 },
    steam: { pressure: 172.4e3 },
    body: { pressure: 11.7e3, overallHeatTransferCoefficient: 1560 },
  });
  it('takes the vapour enthalpy as steam superheated by the BPR', () => {
    // python3-iapws h(11.7 kPa, 362.65 K); Geankoplis chart reading 2667 kJ/kg
    expect(rel(r.vapor.enthalpy, iapws.states[4]!.h)).toBeLessThan(1e-8);
    expect(Math.abs(r.vapor.enthalpy - 2667e3)).toBeLessThan(1e3); // Geankoplis Ex. 8.4-2: 2667 kJ/kg
    expect(r.vapor.superheat).toBeCloseTo(bpr, 9);
  });
  it('needs the book’s steam, area and economy', () => {
    expect(rel(r.steam.massFlow / PER_HOUR, 3255)).toBeLessThan(0.005); // Geankoplis Ex. 8.4-2: S = 3255 kg/h
    expect(rel(r.area, 49.2)).toBeLessThan(0.005); // Geankoplis Ex. 8.4-2: A = 49.2 m²
    expect(Math.abs(r.steamEconomy - 0.836)).toBeLessThan(0.004); // Geankoplis Ex. 8.4-2: 0.836
  });
});

describe('designSingleEffect: McCabe, Smith and Harriott (7th ed.) Example 16.1 with the book’s chart readings', () => {
  // Book data (from memory): 20 000 lb/h of 20 % NaOH at 100 °F to 50 %; steam 20 lbf/in² gauge;
  // vapour space 100 mmHg abs; U = 250 Btu/(ft²·h·°F). Chart readings (from memory): boiling
  // point 197 °F; h_F = 55 Btu/lb, h_L = 221 Btu/lb. Book answers (from memory): steam ≈ 15 400 lb/h,
  // economy ≈ 0.78, area ≈ 933 ft². The book rounds its steam to 3 figures and its ΔT to 62 °F,
  // so ±1.5 % on steam and area.
  const LB = 0.45359237; // kg (exact)
  const BTU_PER_LB = 2326; // J/kg per Btu/lb (International Table Btu, exact)
  const U_SI = 5.678263; // W/(m²·K) per Btu/(ft²·h·°F)
  const FT2 = 0.09290304; // m² (exact)
  const steamP = 20 * 6894.757293 + 101325; // 20 psig, 1 psi = 6894.757 Pa; gauge + 1 atm
  const bodyP = 13332.2; // 100 mmHg, 1 mmHg = 133.322 Pa
  const tb = ((197 - 32) * 5) / 9 + 273.15;
  const r = designSingleEffect({
    liquor: chartReadingLiquor('mccabe-16-1-chart', tb - sat(bodyP).temperature),
    feed: {
      massFlow: (20000 * LB) / 3600,
      massFraction: 0.2,
      temperature: ((100 - 32) * 5) / 9 + 273.15,
      enthalpy: 55 * BTU_PER_LB,
    },
    product: { massFraction: 0.5, enthalpy: 221 * BTU_PER_LB },
    steam: { pressure: steamP },
    body: { pressure: bodyP, overallHeatTransferCoefficient: 250 * U_SI },
  });
  it('needs the book’s steam, economy and area', () => {
    expect(rel((r.steam.massFlow * 3600) / LB, 15400)).toBeLessThan(0.015); // McCabe Ex. 16.1: ≈ 15 400 lb/h
    expect(Math.abs(r.steamEconomy - 0.78)).toBeLessThan(0.01); // McCabe Ex. 16.1: economy ≈ 0.78
    expect(rel(r.area / FT2, 933)).toBeLessThan(0.015); // McCabe Ex. 16.1: ≈ 933 ft²
  });
});

describe('designSingleEffect: heating steam', () => {
  const base: SingleEffectDesignInput = {
    liquor: invariantLiquor,
    feed: { massFlow: 2, massFraction: 0.05, temperature: 320 },
    product: { massFraction: 0.15 },
    steam: { pressure: 143.3e3 },
    body: { pressure: 30e3, overallHeatTransferCoefficient: 2000 },
  };
  const saturated = designSingleEffect(base);
  const s = sat(143.3e3);

  it('superheated steam gives its desuperheat too, so less of it is needed, by (h_g − h_f)/(h_in − h_f)', () => {
    const sh = designSingleEffect({ ...base, steam: { pressure: 143.3e3, superheat: 20 } });
    // python3-iapws: h(143.3 kPa, T_sat + 20 K), region 2
    const ratio = (s.hg - s.hf) / (iapws.states[0]!.h - s.hf);
    expect(rel(sh.steam.massFlow / saturated.steam.massFlow, ratio)).toBeLessThan(1e-8);
    expect(sh.steam.massFlow).toBeLessThan(saturated.steam.massFlow);
    // ΔT, and so the area per unit duty, is set by the condensing temperature, not the inlet temperature
    expect(sh.temperatureDifference).toBeCloseTo(saturated.temperatureDifference, 12);
    expect(sh.steam.inletTemperature).toBeCloseTo(s.temperature + 20, 6);
  });
  it('subcooled condensate gives up sensible heat too, so less steam is needed, by (h_g − h_f)/(h_g − h_out)', () => {
    const sc = designSingleEffect({ ...base, steam: { pressure: 143.3e3, condensateSubcooling: 30 } });
    // python3-iapws: h(143.3 kPa, T_sat − 30 K), region 1
    const ratio = (s.hg - s.hf) / (s.hg - iapws.states[3]!.h);
    expect(rel(sc.steam.massFlow / saturated.steam.massFlow, ratio)).toBeLessThan(1e-8);
    expect(sc.steam.enthalpyOut).toBeLessThan(saturated.steam.enthalpyOut);
  });
  it('accepts the steam by its saturation temperature as well as by its pressure', () => {
    const byT = designSingleEffect({ ...base, steam: { saturationTemperature: s.temperature } });
    expect(rel(byT.steam.pressure, 143.3e3)).toBeLessThan(1e-7); // python3-iapws T_sat(143.3 kPa) inverted
    expect(rel(byT.area, saturated.area)).toBeLessThan(1e-6);
  });
  it('rejects a steam given both by pressure and by temperature', () => {
    expect(() =>
      designSingleEffect({ ...base, steam: { pressure: 143.3e3, saturationTemperature: 383 } }),
    ).toThrow(EngineInputError);
  });
  it('refuses steam that is not hotter than the boiling liquor, with the reason', () => {
    // T_sat(13.3322 kPa) = 324.7 K (python3-iapws) is below the liquor's boiling point at 30 kPa
    const run = () => designSingleEffect({ ...base, steam: { pressure: 13332.2 } });
    expect(run).toThrow(EngineNoSolutionError);
    expect(run).toThrow(/not hot enough/);
  });
});

describe('designSingleEffect: input errors', () => {
  const base: SingleEffectDesignInput = {
    liquor: invariantLiquor,
    feed: { massFlow: 1, massFraction: 0.1, temperature: 330 },
    product: { massFraction: 0.2 },
    steam: { pressure: 200e3 },
    body: { pressure: 20e3, overallHeatTransferCoefficient: 1500 },
  };
  const fieldOf = (fn: () => unknown): string | undefined => {
    try {
      fn();
    } catch (e) {
      return (e as { field?: string }).field;
    }
    return undefined;
  };
  it('rejects a product leaner than the feed, naming the product', () => {
    const fn = () => designSingleEffect({ ...base, product: { massFraction: 0.05 } });
    expect(fn).toThrow(EngineInputError);
    expect(fieldOf(fn)).toBe('product.massFraction');
  });
  it('rejects a negative evaporation, naming it', () => {
    const fn = () => designSingleEffect({ ...base, product: { evaporation: -0.1 } });
    expect(fn).toThrow(EngineInputError);
    expect(fieldOf(fn)).toBe('product.evaporation');
  });
  it('rejects a product mass fraction of 1 or more', () => {
    const fn = () => designSingleEffect({ ...base, product: { massFraction: 1 } });
    expect(fn).toThrow(EngineInputError);
    expect(fieldOf(fn)).toBe('product.massFraction');
  });
  it('rejects a feed mass fraction above 1 with the valid range', () => {
    const fn = () => designSingleEffect({ ...base, feed: { ...base.feed, massFraction: 1.2 } });
    expect(fn).toThrow(EngineRangeError);
    expect(fieldOf(fn)).toBe('feed.massFraction');
  });
  it('rejects a product flow larger than the feed', () => {
    const fn = () => designSingleEffect({ ...base, product: { massFlow: 2 } });
    expect(fieldOf(fn)).toBe('product.massFlow');
  });
  it('rejects two product specifications at once', () => {
    expect(() => designSingleEffect({ ...base, product: { massFraction: 0.2, evaporation: 0.5 } })).toThrow(
      EngineInputError,
    );
  });
  it('rejects a zero U and a heat-loss fraction of 1 with the valid range', () => {
    const u = () =>
      designSingleEffect({ ...base, body: { ...base.body, overallHeatTransferCoefficient: 0 } });
    expect(u).toThrow(EngineRangeError);
    expect(fieldOf(u)).toBe('body.overallHeatTransferCoefficient');
    const f = () => designSingleEffect({ ...base, heatLossFraction: 1 });
    expect(f).toThrow(EngineRangeError);
    expect(fieldOf(f)).toBe('heatLossFraction');
  });
  it('gives the same product whichever product quantity is specified', () => {
    // mass balance (common practice): x_L = 0.2 ⇔ L = F·x_F/x_L = 0.5 kg/s ⇔ V = 0.5 kg/s
    const a = designSingleEffect(base);
    const b = designSingleEffect({ ...base, product: { massFlow: 0.5 } });
    const c = designSingleEffect({ ...base, product: { evaporation: 0.5 } });
    expect(b.product.massFraction).toBeCloseTo(0.2, 12);
    expect(c.product.massFraction).toBeCloseTo(0.2, 12);
    expect(rel(b.area, a.area)).toBeLessThan(1e-12);
    expect(rel(c.area, a.area)).toBeLessThan(1e-12);
  });
});

describe('designSingleEffect: warnings and cautions', () => {
  const base: SingleEffectDesignInput = {
    liquor: invariantLiquor,
    feed: { massFlow: 1, massFraction: 0.05, temperature: 300 },
    product: { massFraction: 0.1 },
    steam: { pressure: 200e3 },
    body: { pressure: 20e3, overallHeatTransferCoefficient: 1500 },
  };
  const codes = (r: { warnings: { code: string }[] }) => r.warnings.map((w) => w.code);
  const cautionCodes = (r: { cautions: { code: string }[] }) => r.cautions.map((c) => c.code);

  it('warns of a flash when the feed enters above its boiling point at the body pressure', () => {
    // T_sat(20 kPa) ≈ 333.2 K (IF97 saturation table, from memory); a feed at 360 K is far above it
    const r = designSingleEffect({ ...base, feed: { ...base.feed, temperature: 360 } });
    expect(codes(r)).toContain('feed-flash');
    expect(codes(designSingleEffect(base))).not.toContain('feed-flash');
  });
  it('warns of a small temperature difference below 5 K', () => {
    // T_sat(20 kPa) ≈ 333.2 K; steam condensing at 340 K leaves ≈ 5 K less the BPR (common practice: ΔT < 5 K is impractical)
    const r = designSingleEffect({ ...base, steam: { saturationTemperature: 337 } });
    expect(r.temperatureDifference).toBeLessThan(5);
    expect(codes(r)).toContain('small-temperature-difference');
    expect(codes(designSingleEffect(base))).not.toContain('small-temperature-difference');
  });
  it('warns when the product is within 5 % of the solubility limit', () => {
    // the test liquor's limit is 0.26 (invented); 0.25 is within 5 % of it
    const r = designSingleEffect({ ...base, product: { massFraction: 0.25 } });
    expect(codes(r)).toContain('near-solubility-limit');
    expect(codes(designSingleEffect(base))).not.toContain('near-solubility-limit');
  });
  it('cautions about vacuum equipment below atmospheric and pressure equipment for steam above it', () => {
    const r = designSingleEffect(base);
    expect(cautionCodes(r)).toEqual(
      expect.arrayContaining([
        'preliminary-estimate',
        'codes-and-licensed-engineer',
        'pressure-equipment',
        'vacuum-equipment',
        'scalding-steam-and-condensate',
        'solubility-and-scaling',
      ]),
    );
    const atmospheric = designSingleEffect({
      ...base,
      steam: { pressure: 101325 },
      body: { ...base.body, pressure: 50e3 },
    });
    expect(cautionCodes(atmospheric)).not.toContain('pressure-equipment');
    const pressurised = designSingleEffect({
      ...base,
      steam: { pressure: 600e3 },
      body: { ...base.body, pressure: 150e3 },
    });
    expect(cautionCodes(pressurised)).not.toContain('vacuum-equipment');
  });
  it('passes on the liquor’s own cautions', () => {
    const liquor = chartReadingLiquor('caustic-like', 10, [
      { code: 'hot-caustic', message: 'Hot concentrated caustic causes severe burns and caustic cracking.' },
    ]);
    const r = designSingleEffect({
      ...base,
      liquor,
      feed: { ...base.feed, enthalpy: 100e3 },
      product: { massFraction: 0.1, enthalpy: 200e3 },
    });
    expect(cautionCodes(r)).toContain('hot-caustic');
  });
  it('cites IF97 and the liquor’s sources', () => {
    const keys = designSingleEffect(base).sources.map((s) => s.key);
    expect(keys).toContain('iapws-if97');
    expect(keys).toContain('test-invariant-brine');
  });
});

describe('designSingleEffect: liquid head', () => {
  // Hydrostatics (common practice): p_mid = p + ρ·g·H/2.
  it('boils at the mid-depth pressure for ΔT while vapour and product leave at the surface', () => {
    const base: SingleEffectDesignInput = {
      liquor: invariantLiquor,
      feed: { massFlow: 1, massFraction: 0.05, temperature: 300 },
      product: { massFraction: 0.1 },
      steam: { pressure: 200e3 },
      body: { pressure: 20e3, overallHeatTransferCoefficient: 1500 },
    };
    const flat = designSingleEffect(base);
    const tall = designSingleEffect({ ...base, body: { ...base.body, liquidHeight: 3 } });
    const rho = 1000 + 700 * 0.1; // the test liquor's density at x = 0.1
    expect(tall.body.meanBoilingPressure).toBeCloseTo(20e3 + (rho * 9.80665 * 3) / 2, 6);
    expect(tall.product.temperature).toBeCloseTo(flat.product.temperature, 12);
    expect(tall.vapor.enthalpy).toBeCloseTo(flat.vapor.enthalpy, 6);
    expect(tall.body.meanBoilingTemperature).toBeGreaterThan(flat.body.meanBoilingTemperature);
    expect(tall.area).toBeGreaterThan(flat.area);
    expect(tall.temperatureDifference).toBeCloseTo(
      tall.steam.temperature - tall.body.meanBoilingTemperature,
      12,
    );
  });
  it('uses liquid-water density with a warning when the liquor has none', () => {
    // A zero-BPR liquor at p_sat(350 K): water density there is that of saturated liquid at 350 K,
    // 973.715 kg/m³ (python3-iapws, tests/fixtures/single-effect-iapws.json).
    const p = iapws.saturated_liquid_350.pressure;
    const r = designSingleEffect({
      liquor: chartReadingLiquor('no-density', 0),
      feed: { massFlow: 1, massFraction: 0.05, temperature: 300, enthalpy: 100e3 },
      product: { massFraction: 0.1, enthalpy: 320e3 },
      steam: { pressure: 200e3 },
      body: { pressure: p, overallHeatTransferCoefficient: 1500, liquidHeight: 2 },
    });
    const rho = iapws.saturated_liquid_350.density;
    expect(rel(r.body.meanBoilingPressure - p, rho * 9.80665)).toBeLessThan(1e-6);
    expect(r.warnings.map((w) => w.code)).toContain('density-assumed-water');
  });
});

describe('designSingleEffect: heat loss', () => {
  it('sizes on the whole duty and lets (1 − f) of it reach the liquor', () => {
    const base: SingleEffectDesignInput = {
      liquor: invariantLiquor,
      feed: { massFlow: 1, massFraction: 0.05, temperature: 300 },
      product: { massFraction: 0.1 },
      steam: { pressure: 200e3 },
      body: { pressure: 20e3, overallHeatTransferCoefficient: 1500 },
    };
    const none = designSingleEffect(base);
    const lossy = designSingleEffect({ ...base, heatLossFraction: 0.04 });
    // energy balance (Geankoplis 8.4 with losses): S·q·(1 − f) is the same heat to the liquor
    expect(rel(lossy.steam.massFlow * 0.96, none.steam.massFlow)).toBeLessThan(1e-12);
    expect(rel(lossy.heatLoss, 0.04 * lossy.duty)).toBeLessThan(1e-12);
    expect(rel(lossy.area * 0.96, none.area)).toBeLessThan(1e-12);
  });
});

describe('rateSingleEffect', () => {
  const design: SingleEffectDesignInput = {
    liquor: invariantLiquor,
    feed: { massFlow: 3, massFraction: 0.04, temperature: 310 },
    product: { massFraction: 0.18 },
    steam: { pressure: 250e3 },
    body: { pressure: 25e3, overallHeatTransferCoefficient: 1800, liquidHeight: 1.5 },
    heatLossFraction: 0.02,
  };
  const d = designSingleEffect(design);
  const { product: _p, ...rest } = design;

  it('with the designed area and the feed fixed, reaches the designed product concentration', () => {
    const r = rateSingleEffect({ ...rest, body: { ...design.body, area: d.area } });
    expect(Math.abs(r.product.massFraction - 0.18)).toBeLessThan(1e-6);
    expect(rel(r.area, d.area)).toBeLessThan(1e-9);
    expect(r.specifiedArea).toBe(d.area);
    expect(r.mode).toBe('rating');
  });
  it('with the designed area and the product fixed, finds the designed feed rate', () => {
    const r = rateSingleEffect({
      ...rest,
      feed: { massFraction: 0.04, temperature: 310 },
      product: { massFraction: 0.18 },
      body: { ...design.body, area: d.area },
    });
    expect(rel(r.feed.massFlow, 3)).toBeLessThan(1e-9);
  });
  it('reaches a richer product with more area', () => {
    const r = rateSingleEffect({ ...rest, body: { ...design.body, area: 1.05 * d.area } });
    expect(r.product.massFraction).toBeGreaterThan(0.18);
  });
  it('reports clearly when the area cannot even bring the feed to its boiling point', () => {
    const fn = () => rateSingleEffect({ ...rest, body: { ...design.body, area: 1e-3 } });
    expect(fn).toThrow(EngineNoSolutionError);
    expect(fn).toThrow(/too small to bring the feed to its boiling point/);
  });
  it('reports when the area would concentrate beyond the model’s range', () => {
    const fn = () => rateSingleEffect({ ...rest, body: { ...design.body, area: 100 * d.area } });
    expect(fn).toThrow(/beyond x = /);
  });
  it('rejects a rating with both the feed rate and the product fixed', () => {
    expect(() =>
      rateSingleEffect({ ...rest, product: { massFraction: 0.18 }, body: { ...design.body, area: d.area } }),
    ).toThrow(EngineInputError);
  });
});
