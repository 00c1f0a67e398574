/**
 * Single-effect design against textbook worked examples, with Ebullio's real liquor models:
 * the sodium-hydroxide model (Olsson, Jernqvist and Aly 1997) and a custom polynomial liquor
 * (server/engine/liquors/custom.ts). The books read their boiling points and enthalpies from
 * Dühring and enthalpy–concentration charts; the tolerances below are what those chart readings
 * justify, and are stated beside each check. The same examples run with the books' own chart
 * readings (tighter tolerances) in single-effect.test.ts.
 */
import { describe, expect, it } from 'vitest';
import { designSingleEffect, rateSingleEffect } from '../../../server/engine/evaporators/single-effect.js';
import { createCustomLiquor } from '../../../server/engine/liquors/custom.js';
import { sodiumHydroxide } from '../../../server/engine/liquors/sodium-hydroxide.js';
import { saturationTemperature } from '../../../server/engine/steam/if97.js';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
const C = (t: number) => t + 273.15;
const F_TO_K = (f: number) => ((f - 32) * 5) / 9 + 273.15;

describe('Geankoplis (4th ed.) Example 8.4-1 with a custom polynomial liquor', () => {
  // Book (from memory): 9072 kg/h of 1.0 wt% salt at 311.0 K to 1.5 wt%; 101.325 kPa; saturated
  // steam 143.3 kPa; U = 1704 W/(m²·K); BPR neglected; c_p = 4.14 kJ/(kg·K).
  // Book answers (from memory): S = 4108 kg/h, A = 149.3 m².
  // The custom polynomial liquor puts h = c_p·(T − 273.16 K) on the steam-table datum, so
  // H_V − h_L differs from the book's λ(373.2 K) = 2257 kJ/kg by c_p·100 K − h_f(100 °C) ≈ 5 kJ/kg
  // (0.2 %); with the book's rounded steam-table readings, ±0.5 % on S and A.
  const liquor = createCustomLiquor({
    name: 'Dilute salt solution',
    boilingPointRise: { polynomial: [0] },
    heatCapacity: { polynomial: [4140] },
    validity: { massFraction: { min: 0, max: 0.05 } },
  });
  const r = designSingleEffect({
    liquor,
    feed: { massFlow: 9072 / 3600, massFraction: 0.01, temperature: 311.0 },
    product: { massFraction: 0.015 },
    steam: { pressure: 143.3e3 },
    body: { pressure: 101325, overallHeatTransferCoefficient: 1704 },
  });
  it('needs the book’s steam and area', () => {
    expect(rel(r.steam.massFlow * 3600, 4108)).toBeLessThan(0.005); // Geankoplis Ex. 8.4-1: S = 4108 kg/h
    expect(rel(r.area, 149.3)).toBeLessThan(0.005); // Geankoplis Ex. 8.4-1: A = 149.3 m²
    expect(r.boilingPointRise).toBe(0); // Geankoplis Ex. 8.4-1: BPR neglected
  });
});

describe('Geankoplis (4th ed.) Example 8.4-2 with the sodium-hydroxide model', () => {
  // Book (from memory): 4536 kg/h of 20 % NaOH at 60 °C to 50 %; steam saturated at 172.4 kPa;
  // vapour space 11.7 kPa; U = 1560 W/(m²·K). Chart readings (from memory): boiling point
  // 89.5 °C, h_F = 214 kJ/kg, h_L = 505 kJ/kg, H_V = 2667 kJ/kg. Answers (from memory):
  // S = 3255 kg/h, A = 49.2 m², economy 0.836.
  // Tolerances: ±1.5 K on the boiling point (a Dühring-chart reading); ±3 % on S and on the
  // duty per unit U (Q/U = A·ΔT), which the enthalpy chart governs; the area itself moves by
  // δT/ΔT = 1.5 K / 26.1 K = 5.7 % for a 1.5 K boiling-point difference, so ±6.7 % on A
  // (that plus 1 %).
  const r = designSingleEffect({
    liquor: sodiumHydroxide,
    feed: { massFlow: 4536 / 3600, massFraction: 0.2, temperature: C(60) },
    product: { massFraction: 0.5 },
    steam: { pressure: 172.4e3 },
    body: { pressure: 11.7e3, overallHeatTransferCoefficient: 1560 },
  });
  it('boils at the book’s Dühring-chart boiling point within 1.5 K', () => {
    expect(Math.abs(r.product.temperature - C(89.5))).toBeLessThan(1.5); // Geankoplis Ex. 8.4-2: 89.5 °C
  });
  it('uses enthalpies within the enthalpy–concentration chart’s reading of the book', () => {
    // chart readings are to about ±5 kJ/kg on the book's figure; ±8 kJ/kg here
    expect(Math.abs(r.feed.enthalpy - 214e3)).toBeLessThan(8e3); // Geankoplis Ex. 8.4-2: h_F = 214 kJ/kg
    expect(Math.abs(r.product.enthalpy - 505e3)).toBeLessThan(8e3); // Geankoplis Ex. 8.4-2: h_L = 505 kJ/kg
    expect(Math.abs(r.vapor.enthalpy - 2667e3)).toBeLessThan(5e3); // Geankoplis Ex. 8.4-2: H_V = 2667 kJ/kg
  });
  it('needs the book’s steam within 3 % and its area within the boiling-point reading', () => {
    expect(rel(r.steam.massFlow * 3600, 3255)).toBeLessThan(0.03); // Geankoplis Ex. 8.4-2: S = 3255 kg/h
    expect(rel(r.steamEconomy, 0.836)).toBeLessThan(0.03); // Geankoplis Ex. 8.4-2: economy 0.836
    // Geankoplis Ex. 8.4-2: A = 49.2 m² with ΔT = 115.6 − 89.5 = 26.1 K
    expect(rel(r.area * r.temperatureDifference, 49.2 * 26.1)).toBeLessThan(0.03);
    expect(rel(r.area, 49.2)).toBeLessThan(0.067);
  });
  it('warns that the 60 °C feed flashes at 11.7 kPa and carries the caustic and vacuum cautions', () => {
    // Dühring chart for NaOH (Geankoplis Fig. 8.4-2, from memory): 20 % NaOH boils about 8 K above
    // water, i.e. near 57 °C at 11.7 kPa (water 48.9 °C, python3-iapws): a 60 °C feed flashes.
    expect(r.warnings.map((w) => w.code)).toContain('feed-flash');
    const codes = r.cautions.map((c) => c.code);
    expect(codes).toContain('vacuum-equipment'); // 11.7 kPa < 101.325 kPa
    expect(codes).toContain('pressure-equipment'); // 172.4 kPa steam > 101.325 kPa
    expect(codes).toContain('hot-caustic-burns'); // domain.md §6: hot concentrated caustic
    expect(r.sources.map((s) => s.key)).toContain('iapws-if97');
    const cold = designSingleEffect({
      liquor: sodiumHydroxide,
      feed: { massFlow: 4536 / 3600, massFraction: 0.2, temperature: C(40) },
      product: { massFraction: 0.5 },
      steam: { pressure: 172.4e3 },
      body: { pressure: 11.7e3, overallHeatTransferCoefficient: 1560 },
    });
    // 40 °C is below water's 48.9 °C boiling point at 11.7 kPa (python3-iapws): no flash
    expect(cold.warnings.map((w) => w.code)).not.toContain('feed-flash');
  });
  it('rates the designed area back to the 50 % product to 1e-6', () => {
    const back = rateSingleEffect({
      liquor: sodiumHydroxide,
      feed: { massFlow: 4536 / 3600, massFraction: 0.2, temperature: C(60) },
      steam: { pressure: 172.4e3 },
      body: { pressure: 11.7e3, overallHeatTransferCoefficient: 1560, area: r.area },
    });
    expect(Math.abs(back.product.massFraction - 0.5)).toBeLessThan(1e-6);
  });
});

describe('McCabe, Smith and Harriott (7th ed.) Example 16.1 with the sodium-hydroxide model', () => {
  // Book (from memory): 20 000 lb/h of 20 % NaOH at 100 °F to 50 %; steam 20 lbf/in² gauge;
  // 100 mmHg abs; U = 250 Btu/(ft²·h·°F). Book (from memory): boiling point 197 °F (Dühring
  // chart), steam ≈ 15 400 lb/h, economy ≈ 0.78, area ≈ 933 ft² with ΔT = 259 − 197 = 62 °F.
  // Tolerances: ±2.5 K on the boiling point (a Dühring-chart reading at low pressure); ±3 % on
  // steam, economy and duty per U; the area moves by δT/ΔT = 4.5 °F / 62 °F = 7.3 % for a 2.5 K
  // difference, so ±8.3 % on A.
  const LB = 0.45359237; // kg per lb (exact)
  const FT2 = 0.09290304; // m² per ft² (exact)
  const U_SI = 5.678263; // W/(m²·K) per Btu/(ft²·h·°F)
  const r = designSingleEffect({
    liquor: sodiumHydroxide,
    feed: { massFlow: (20000 * LB) / 3600, massFraction: 0.2, temperature: F_TO_K(100) },
    product: { massFraction: 0.5 },
    steam: { pressure: 20 * 6894.757293 + 101325 }, // 20 psig: 1 psi = 6894.757 Pa, + 1 atm
    body: { pressure: 100 * 133.322368, overallHeatTransferCoefficient: 250 * U_SI }, // 1 mmHg = 133.322 Pa
  });
  it('boils near the book’s 197 °F', () => {
    expect(Math.abs(r.product.temperature - F_TO_K(197))).toBeLessThan(2.5); // McCabe Ex. 16.1: 197 °F
  });
  it('needs the book’s steam and economy within 3 % and its area within the boiling-point reading', () => {
    expect(rel((r.steam.massFlow * 3600) / LB, 15400)).toBeLessThan(0.03); // McCabe Ex. 16.1: 15 400 lb/h
    expect(rel(r.steamEconomy, 0.78)).toBeLessThan(0.03); // McCabe Ex. 16.1: economy 0.78
    // McCabe Ex. 16.1: A = 933 ft² at ΔT = 62 °F (= 34.44 K)
    expect(rel((r.area / FT2) * r.temperatureDifference, 933 * ((62 * 5) / 9))).toBeLessThan(0.03);
    expect(rel(r.area / FT2, 933)).toBeLessThan(0.083);
  });
});

describe('Coulson & Richardson Vol. 2 (5th ed.) Example 14.1 with a custom polynomial liquor', () => {
  // Book values (as reproduced in a published worked-example companion): 7 kg/s of 10 % solids at
  // 294 K to 50 %; dry saturated steam at 205 kN/m² (394 K); evaporation at 13.5 kN/m² (325 K);
  // no BPR; c_p 3.76 kJ/(kg·K) for the feed and 3.14 for the product (a line in x through both);
  // condensate leaves at 352.7 K; U = 3 kW/(m²·K). Book: heat from the steam 14 202 kW, ΔT 69 K,
  // area 68.6 m². Its steam figure (6.47 kg/s) uses 2530 kJ/kg for saturated steam at 205 kN/m²,
  // against 2706 kJ/kg in IAPWS-IF97, so steam is not compared; duty and area do not use it.
  const liquor = createCustomLiquor({
    name: 'Coulson-Richardson 14.1 liquor',
    boilingPointRise: { polynomial: [0] },
    heatCapacity: { polynomial: [3915, -1550] },
    validity: { massFraction: { min: 0, max: 0.6 } },
  });

  it('needs the book’s duty and area within the steam-table rounding (1 %)', () => {
    const condensing = saturationTemperature(205e3);
    const r = designSingleEffect({
      liquor,
      feed: { massFlow: 7, massFraction: 0.1, temperature: 294 },
      product: { massFraction: 0.5 },
      steam: { pressure: 205e3, condensateSubcooling: condensing - 352.7 },
      body: { pressure: 13.5e3, overallHeatTransferCoefficient: 3000 },
    });
    // book: 5.6 kg/s evaporated, 14 202 kW, ΔT 69 K (394 − 325, rounded to 1 K), 68.6 m²
    expect(rel(r.vapor.massFlow, 5.6)).toBeLessThan(1e-12);
    expect(rel(r.duty, 14_202e3)).toBeLessThan(0.01);
    expect(Math.abs(r.temperatureDifference - 69)).toBeLessThan(1);
    expect(rel(r.area, 68.6)).toBeLessThan(0.01);
  });
});
