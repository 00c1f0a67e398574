/**
 * Multiple-effect refusals and warnings from a liquor model name the effect and the quantity
 * (effects[i].boilingTemperature, effects[i].pressure, effects[i].massFraction, "effect i+1: …"),
 * never a request field that merely shares the word (the last effect's pressure).
 */
import { describe, expect, it } from 'vitest';
import { EngineRangeError } from '../../../server/engine/errors.js';
import { designMultipleEffect } from '../../../server/engine/evaporators/multiple-effect.js';
import { seawater } from '../../../server/engine/liquors/seawater.js';
import { sodiumHydroxide } from '../../../server/engine/liquors/sodium-hydroxide.js';
import { sucrose } from '../../../server/engine/liquors/sucrose.js';

describe('multiple-effect labels', () => {
  it('refuses seawater boiling above 120 °C in effect 1 as effects[0].boilingTemperature', () => {
    // Sharqawy et al. (2010): the seawater BPR correlation stops at 120 °C (the model's limit).
    // With 500 kPa steam (151.8 °C) and 250 kPa in the last effect (127.4 °C, IF97 steam tables),
    // every effect boils above 120 °C; effect 1 is evaluated first.
    let err: unknown;
    try {
      designMultipleEffect({
        liquor: seawater,
        feed: { massFlow: 10, massFraction: 0.035, temperature: 323.15 },
        productMassFraction: 0.07,
        steam: { pressure: 500e3 },
        lastEffectPressure: 250e3,
        overallHeatTransferCoefficients: [2000, 2000, 2000],
      });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(EngineRangeError);
    const range = err as EngineRangeError;
    expect(range.field).toMatch(/^effects\[\d\]\.boilingTemperature$/);
    expect(range.context).toMatch(/^effect \d$/);
    expect(range.message).toMatch(/^effect \d: /);
    expect(range.validRange.unit).toBe('K');
    expect(range.value).toBeGreaterThan(393.15);
  });

  it('labels liquor warnings with the effect they arose in', () => {
    // The sucrose model's data reach about 0.85 kg/kg (Starzak and Peacock 1997) and its enthalpy
    // data 100 °C (Lyle): an 88 % syrup in effect 2 and effect 1 boiling above 100 °C lie outside
    // them, so the model warns from inside the train.
    const r = designMultipleEffect({
      liquor: sucrose,
      feed: { massFlow: 10, massFraction: 0.15, temperature: 323.15 },
      productMassFraction: 0.88,
      steam: { pressure: 400e3 },
      lastEffectPressure: 15e3,
      overallHeatTransferCoefficients: [2000, 2000],
    });
    const fromLiquor = r.warnings.filter((w) => w.code === 'model-extrapolated');
    expect(fromLiquor.map((w) => w.field)).toContain('effects[1].massFraction');
    for (const w of fromLiquor) {
      expect(w.field).toMatch(/^(effects\[\d\]\.(massFraction|pressure|boilingTemperature)|feed\.\w+)$/);
      expect(w.message).toMatch(/^(effect \d|feed): /);
    }
    expect(r.warnings.some((w) => w.field === 'pressure' || w.field === 'temperature')).toBe(false);
  });

  it('refuses a pure-water feed with an input error naming feed.massFraction (no 5e-324 range)', () => {
    expect(() =>
      designMultipleEffect({
        liquor: sodiumHydroxide,
        feed: { massFlow: 10, massFraction: 0, temperature: 323.15 },
        productMassFraction: 0.1,
        steam: { pressure: 400e3 },
        lastEffectPressure: 15e3,
        overallHeatTransferCoefficients: [2000, 2000],
      }),
    ).toThrow(expect.objectContaining({ name: 'EngineInputError', field: 'feed.massFraction' }));
  });
});
