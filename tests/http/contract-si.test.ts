// Quantity inputs are converted to SI by the contracts' own metadata (server/http/quantities.ts):
// each `quantity(spec, …)` field of a request schema is found once, and a parsed request is
// converted along that list, so a handler receives SI numbers. Factors: the SI brochure and NIST
// SP 811 (1 t = 1000 kg, 1 h = 3600 s, 1 bar = 100 kPa, 0 °C = 273.15 K); gauge pressures add one
// standard atmosphere, 101.325 kPa (common practice).
import { describe, expect, it } from 'vitest';
import {
  MultipleEffectRequestSchema,
  SingleEffectRequestSchema,
  SteamStateRequestSchema,
} from '../../shared/contracts/index.js';
import { ProblemError } from '../../server/http/problem.js';
import { siPlan, toSI } from '../../server/http/quantities.js';

describe('SI conversion driven by the contract', () => {
  it('converts every quantity of a single-effect request to SI and leaves the other fields as sent', () => {
    const parsed = SingleEffectRequestSchema.parse({
      liquor: 'sodium-hydroxide',
      feed: { massFlow: '4.5 t/h', massFraction: '10 %', temperature: 40 },
      product: { massFraction: 0.3 },
      steam: { pressure: '3 barg' },
      body: { pressure: 20, overallHeatTransferCoefficient: '1.8 kW/(m²·K)' },
    });
    const si = toSI(siPlan(SingleEffectRequestSchema), parsed);
    expect(si.liquor).toBe('sodium-hydroxide');
    expect(si.feed.massFlow).toBeCloseTo(1.25, 12); // 4.5 t/h = 4500 kg / 3600 s
    expect(si.feed.massFraction).toBeCloseTo(0.1, 12);
    expect(si.feed.temperature).toBeCloseTo(313.15, 9);
    expect(si.product.massFraction).toBe(0.3);
    expect(si.steam.pressure).toBeCloseTo(401_325, 6); // 3 bar + 101.325 kPa
    expect(si.body.pressure).toBeCloseTo(20_000, 9);
    expect(si.body.overallHeatTransferCoefficient).toBeCloseTo(1800, 9);
  });

  it('converts quantities inside arrays and array items (U per effect, areas, bleeds)', () => {
    const parsed = MultipleEffectRequestSchema.parse({
      liquor: 'sucrose',
      effects: 2,
      feed: { massFlow: '36 t/h', massFraction: '15 Bx', temperature: 95 },
      steam: { pressure: '2 barg' },
      lastEffectPressure: '200 mbar',
      overallHeatTransferCoefficients: ['2.8 kW/(m²·K)', 1800],
      areas: [80, '90 m2'],
      vaporBleeds: [{ effect: 1, massFlow: '720 kg/h' }],
    });
    const si = toSI(siPlan(MultipleEffectRequestSchema), parsed);
    expect(si.feed.massFlow).toBeCloseTo(10, 12);
    expect(si.feed.massFraction).toBeCloseTo(0.15, 12);
    expect(si.lastEffectPressure).toBeCloseTo(20_000, 9);
    expect(si.overallHeatTransferCoefficients).toEqual([2800, 1800]);
    expect(si.areas).toEqual([80, 90]);
    expect(si.vaporBleeds?.[0]?.effect).toBe(1);
    expect(si.vaporBleeds?.[0]?.massFlow).toBeCloseTo(0.2, 12); // 720 kg / 3600 s
    expect(si.effects).toBe(2);
  });

  it('refuses a string in an unknown unit with a 422 naming the field inside its array', () => {
    const parsed = MultipleEffectRequestSchema.parse({
      liquor: 'sucrose',
      effects: 2,
      feed: { massFlow: 10, massFraction: 0.15, temperature: 95 },
      steam: { pressure: 300 },
      lastEffectPressure: 20,
      overallHeatTransferCoefficients: [2800, 1800],
      areas: [80, '90 furlongs'],
    });
    let caught: unknown;
    try {
      toSI(siPlan(MultipleEffectRequestSchema), parsed);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(ProblemError);
    const p = caught as ProblemError;
    expect(p.status).toBe(422);
    expect(p.errors?.[0]?.field).toBe('areas[1]');
  });

  it('refuses a converted string outside the field’s range, stating the range in display units', () => {
    const parsed = SteamStateRequestSchema.parse({ pressure: '2000 bar', temperature: 300 });
    let caught: unknown;
    try {
      toSI(siPlan(SteamStateRequestSchema), parsed);
    } catch (err) {
      caught = err;
    }
    const p = caught as ProblemError;
    expect(p.status).toBe(422);
    expect(p.errors?.[0]).toMatchObject({
      field: 'pressure',
      value: '2000 bar',
      validRange: { min: 0.1, max: 100_000, unit: 'kPa' },
    });
  });
});
