/**
 * El-Dessouky's steam-jet ejector correlation (El-Dessouky and Ettouney, Fundamentals of Salt Water
 * Desalination, 2002): the code against a hand computation of the printed formula, the mixing
 * balance, and each bound of the printed validity (warn outside, refuse where meaningless).
 *
 * No check against the book's own worked ejector or MED-TVC example: its inputs and results are not
 * recalled reliably here, so none is invented.
 */
import { describe, expect, it } from 'vitest';
import { EngineNoSolutionError } from '../../../server/engine/errors.js';
import {
  checkThermocompressor,
  dischargeEnthalpy,
  elDessoukyMotivePerEntrained,
  elDessoukyPressureCorrectionFactor,
  elDessoukyTemperatureCorrectionFactor,
  requireWorkingEjector,
  type EjectorPoint,
} from '../../../server/engine/evaporators/thermocompressor.js';
import { saturationTemperature } from '../../../server/engine/steam/if97.js';
import type { EngineWarning } from '../../../server/engine/types.js';
import { expectRangeError } from '../expect-range-error.js';

const C = 273.15;

function point(pmKPa: number, pcKPa: number, peKPa: number, teC?: number): EjectorPoint {
  return {
    motivePressure: pmKPa * 1e3,
    dischargePressure: pcKPa * 1e3,
    suctionPressure: peKPa * 1e3,
    suctionTemperature: teC === undefined ? saturationTemperature(peKPa * 1e3) : teC + C,
  };
}

function warningsAt(p: EjectorPoint): EngineWarning[] {
  const w: EngineWarning[] = [];
  checkThermocompressor(p, w);
  return w;
}

describe("El-Dessouky's entrainment correlation, against the printed formula by hand", () => {
  it('gives Ra = 1.34409 for P_m = 1000 kPa, P_c = 35 kPa, P_e = 15 kPa, T_e = 50 °C', () => {
    // Printed formula (El-Dessouky and Ettouney 2002), pressures in kPa, T_e in °C:
    // PCF = 3e-7·1000² − 0.0009·1000 + 1.6101 = 0.3 − 0.9 + 1.6101 = 1.0101
    // TCF = 2e-8·50² − 0.0006·50 + 1.0047 = 0.00005 − 0.03 + 1.0047 = 0.97475
    // 35^1.19 = exp(1.19·ln 35) = exp(1.19·3.555348) = exp(4.230864) = 68.77664
    // 15^1.04 = exp(1.04·ln 15) = exp(1.04·2.708050) = exp(2.816372) = 16.71610
    // (1000/15)^0.015 = exp(0.015·4.199705) = exp(0.06299557) = 1.065022
    // Ra = 0.296 · 68.77664/16.71610 · 1.065022 · 1.0101/0.97475
    //    = 0.296 · 4.114400 · 1.065022 · 1.036266 = 1.344087
    expect(elDessoukyPressureCorrectionFactor(1000e3)).toBeCloseTo(1.0101, 12);
    expect(elDessoukyTemperatureCorrectionFactor(50 + C)).toBeCloseTo(0.97475, 12);
    const ra = elDessoukyMotivePerEntrained(1000e3, 35e3, 15e3, 50 + C);
    expect(Math.abs(ra - 1.344087) / 1.344087).toBeLessThan(1e-6);
  });

  it('needs more motive steam for a higher discharge and less for a higher suction pressure', () => {
    // the printed exponents: Ra ∝ P_c^1.19 and ∝ P_e^−1.055 overall
    const base = elDessoukyMotivePerEntrained(1000e3, 35e3, 15e3, 50 + C);
    expect(elDessoukyMotivePerEntrained(1000e3, 40e3, 15e3, 50 + C)).toBeCloseTo(
      base * (40 / 35) ** 1.19,
      10,
    );
    expect(elDessoukyMotivePerEntrained(1000e3, 35e3, 20e3, 50 + C)).toBeLessThan(base);
  });

  it('mixes the discharge adiabatically: (Ra·h_m + h_e)/(1 + Ra)', () => {
    // 2 kg motive at 2778 kJ/kg + 1 kg entrained at 2600 kJ/kg → 3 kg at 8156/3 kJ/kg
    expect(dischargeEnthalpy(2, 2778e3, 2600e3)).toBeCloseTo(8156e3 / 3, 6);
  });
});

describe('Validity of the ejector correlation: warned outside, refused where meaningless', () => {
  it('is silent inside every bound', () => {
    expect(warningsAt(point(1000, 35, 15))).toEqual([]);
  });

  it('warns when more than 4 kg of motive steam is needed per kg entrained (Ra > 4)', () => {
    const p = point(1000, 100, 10);
    const w = warningsAt(p);
    expect(checkThermocompressor(p, undefined)).toBeGreaterThan(4);
    expect(w.map((x) => x.field)).toContain('thermocompressor.motivePerEntrained');
    expect(w.every((x) => x.code === 'model-extrapolated')).toBe(true);
  });

  it('warns for a motive pressure below 100 kPa and above 3500 kPa', () => {
    for (const pm of [90, 4000]) {
      const w = warningsAt(point(pm, 35, 15));
      expect(w.map((x) => x.field)).toEqual(['thermocompressor.motivePressure']);
      expect(w[0]!.values?.pm).toEqual({ value: pm * 1e3, kind: 'pressure' });
      expect(w[0]!.validRange).toEqual({ min: 100e3, max: 3500e3, unit: 'Pa' });
    }
  });

  it('warns for a suction saturation temperature below 10 °C and above 500 °C', () => {
    // 1 kPa boils water at 6.97 °C (IF97); 520 °C lies beyond any saturation state (a synthetic point)
    for (const p of [point(1000, 3, 1), point(1000, 35, 15, 520)]) {
      const fields = warningsAt(p).map((x) => x.field);
      expect(fields).toContain('thermocompressor.suctionTemperature');
    }
  });

  it('warns for a compression ratio below 1.81', () => {
    const w = warningsAt(point(1000, 25, 15));
    expect(w.map((x) => x.field)).toEqual(['thermocompressor.compressionRatio']);
  });

  it('refuses a meaningless entrainment (non-finite or non-positive Ra)', () => {
    expect(() => checkThermocompressor(point(Number.NaN, 35, 15), [])).toThrow(EngineNoSolutionError);
    expect(() => checkThermocompressor(point(1000, 35, 0, 50), [])).toThrow(EngineNoSolutionError);
  });

  it('refuses a discharge not above the suction and a motive steam not above the discharge', () => {
    const e1 = expectRangeError(() => requireWorkingEjector(point(1000, 15, 15)), {
      field: 'steam.pressure',
      value: 15e3,
    });
    expect(e1.validRange.min).toBe(15e3);
    const e2 = expectRangeError(() => requireWorkingEjector(point(30, 35, 15)), {
      field: 'thermocompressor.motivePressure',
      value: 30e3,
    });
    expect(e2.validRange.min).toBe(35e3);
  });
});
