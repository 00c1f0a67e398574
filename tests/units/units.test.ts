/**
 * Unit conversions checked against exact unit definitions: NIST Special Publication 811 (2008),
 * "Guide for the Use of the International System of Units", Appendix B, and the definitions
 * behind it (international yard and pound agreement 1959: 1 ft = 0.3048 m, 1 lb = 0.45359237 kg;
 * standard gravity 9.80665 m/s² (CGPM 1901); 1 atm = 101 325 Pa (CGPM 1954); 1 bar = 10⁵ Pa;
 * 1 Btu_IT = 1055.05585262 J (Fifth International Conference on the Properties of Steam, 1956);
 * conventional mmHg = 13 595.1 kg/m³ × g_n × 1 mm = 133.322387415 Pa). Each factor below is
 * written from those definitions, not from the code under test.
 */
import { describe, expect, it } from 'vitest';
import {
  acceptedUnits,
  defaultUnits,
  formatOutput,
  fromDefaultUnit,
  parseQuantity,
  quantityKinds,
  toDefaultUnit,
  UnitError,
  type QuantityKind,
} from '../../server/units/index.js';

const LB = 0.45359237; // kg, exact (1959 agreement)
const FT = 0.3048; // m, exact (1959 agreement)
const IN = 0.0254; // m, exact
const GN = 9.80665; // m/s², exact (CGPM 1901)
const BTU = 1055.05585262; // J, exact (IT Btu)
const PSI = (LB * GN) / IN ** 2; // Pa: lbf/in², NIST SP 811 lists 6.894 757 E+03
const ATM = 101_325; // Pa, exact

function unitError(input: number | string, kind: QuantityKind, field = 'body.x'): UnitError {
  try {
    parseQuantity(input, kind, field);
  } catch (e) {
    expect(e).toBeInstanceOf(UnitError);
    return e as UnitError;
  }
  throw new Error(`"${String(input)}" was accepted as a ${kind}`);
}

describe('parseQuantity: pressure', () => {
  it('reads a bare number as kPa absolute', () => {
    expect(parseQuantity(101.325, 'pressure', 'p')).toBeCloseTo(ATM, 9);
  });
  it('converts bar, mbar, MPa, Pa and atm by their definitions', () => {
    expect(parseQuantity('1.4 bar', 'pressure', 'p')).toBeCloseTo(1.4e5, 9); // 1 bar = 1e5 Pa, exact
    expect(parseQuantity('1.4bar', 'pressure', 'p')).toBeCloseTo(1.4e5, 9); // no space: same
    expect(parseQuantity('250 mbar', 'pressure', 'p')).toBeCloseTo(25_000, 9);
    expect(parseQuantity('1.2 MPa', 'pressure', 'p')).toBeCloseTo(1.2e6, 6);
    expect(parseQuantity('500 Pa', 'pressure', 'p')).toBe(500);
    expect(parseQuantity('1 atm', 'pressure', 'p')).toBeCloseTo(ATM, 9); // CGPM 1954, exact
  });
  it('uses the exact psi and mmHg, not a rounded value', () => {
    // NIST SP 811 App. B: 1 psi = 6.894 757 E+03 Pa; 1 mmHg (conventional) = 1.333 224 E+02 Pa.
    expect(parseQuantity('1 psi', 'pressure', 'p')).toBeCloseTo(PSI, 9);
    expect(parseQuantity('1 psi', 'pressure', 'p')).toBeCloseTo(6894.757, 3);
    expect(parseQuantity('100 mmHg', 'pressure', 'p')).toBeCloseTo(13_332.2387415, 6);
  });
  it('adds one standard atmosphere to gauge units (common practice)', () => {
    expect(parseQuantity('2 barg', 'pressure', 'p')).toBeCloseTo(2e5 + ATM, 9);
    expect(parseQuantity('50 kPag', 'pressure', 'p')).toBeCloseTo(50_000 + ATM, 9);
    expect(parseQuantity('20 psig', 'pressure', 'p')).toBeCloseTo(20 * PSI + ATM, 9);
    expect(parseQuantity('-0.5 barg', 'pressure', 'p')).toBeCloseTo(ATM - 0.5e5, 9); // vacuum in gauge terms
  });
  it('rejects a gauge vacuum deeper than absolute zero pressure', () => {
    expect(unitError('-2 barg', 'pressure').message).toMatch(/absolute pressure cannot be negative/);
  });
});

describe('parseQuantity: temperature and temperature difference', () => {
  it('reads a bare number as °C and accepts °C, degC, C, K, °F, degF, F', () => {
    expect(parseQuantity(38, 'temperature', 't')).toBeCloseTo(311.15, 9); // T/K = t/°C + 273.15, exact
    expect(parseQuantity('38 degC', 'temperature', 't')).toBeCloseTo(311.15, 9);
    expect(parseQuantity('38 °C', 'temperature', 't')).toBeCloseTo(311.15, 9);
    expect(parseQuantity('38 C', 'temperature', 't')).toBeCloseTo(311.15, 9);
    expect(parseQuantity('-3 °C', 'temperature', 't')).toBeCloseTo(270.15, 9);
    expect(parseQuantity('350 K', 'temperature', 't')).toBe(350);
    // T/K = (t/°F + 459.67) × 5/9, exact (NIST SP 811 App. B.8)
    expect(parseQuantity('212 °F', 'temperature', 't')).toBeCloseTo(((212 + 459.67) * 5) / 9, 9);
    expect(parseQuantity('100 degF', 'temperature', 't')).toBeCloseTo(((100 + 459.67) * 5) / 9, 9);
    expect(parseQuantity('-40 F', 'temperature', 't')).toBeCloseTo(233.15, 9); // −40 °F = −40 °C
  });
  it('treats a difference of degrees as a difference, not an absolute temperature', () => {
    expect(parseQuantity(10, 'temperatureDifference', 'dt')).toBe(10); // default K
    expect(parseQuantity('10 degC', 'temperatureDifference', 'dt')).toBeCloseTo(10, 12); // 1 Δ°C = 1 K
    expect(parseQuantity('18 °F', 'temperatureDifference', 'dt')).toBeCloseTo(10, 12); // 1 Δ°F = 5/9 K
  });
  it('rejects a temperature below absolute zero', () => {
    expect(unitError('-300 °C', 'temperature').message).toMatch(/below 0 K/);
  });
});

describe('parseQuantity: flows, energies, coefficients, geometry, power, density', () => {
  it('converts mass flows', () => {
    expect(parseQuantity(2, 'massFlow', 'f')).toBe(2); // default kg/s
    expect(parseQuantity('4.5 t/h', 'massFlow', 'f')).toBeCloseTo(1.25, 12); // 1 t = 1000 kg, 1 h = 3600 s
    expect(parseQuantity('3600 kg/h', 'massFlow', 'f')).toBeCloseTo(1, 12);
    expect(parseQuantity('10000 lb/h', 'massFlow', 'f')).toBeCloseTo((10_000 * LB) / 3600, 12);
    expect(parseQuantity('1 lb/s', 'massFlow', 'f')).toBeCloseTo(LB, 12);
  });
  it('converts specific enthalpy with the IT Btu (1 Btu/lb = 2.326 kJ/kg exactly)', () => {
    expect(parseQuantity(2257, 'specificEnthalpy', 'h')).toBeCloseTo(2.257e6, 6); // default kJ/kg
    expect(parseQuantity('1 Btu/lb', 'specificEnthalpy', 'h')).toBeCloseTo(2326, 9); // NIST SP 811: 2.326 E+03
    expect(parseQuantity('500 J/kg', 'specificEnthalpy', 'h')).toBe(500);
  });
  it('converts heat capacity (default kJ/(kg·K); 1 Btu/(lb·°F) = 4186.8 J/(kg·K) exactly)', () => {
    expect(parseQuantity(4.19, 'specificHeatCapacity', 'cp')).toBeCloseTo(4190, 9);
    expect(parseQuantity('3.955 kJ/(kg·K)', 'specificHeatCapacity', 'cp')).toBeCloseTo(3955, 9);
    expect(parseQuantity('4.19 kJ/kg/K', 'specificHeatCapacity', 'cp')).toBeCloseTo(4190, 9);
    expect(parseQuantity('1 Btu/(lb·°F)', 'specificHeatCapacity', 'cp')).toBeCloseTo(4186.8, 9); // NIST SP 811
  });
  it('converts heat-transfer coefficients', () => {
    expect(parseQuantity(1704, 'heatTransferCoefficient', 'U')).toBe(1704); // default W/(m²·K)
    expect(parseQuantity('2.5 kW/(m²·K)', 'heatTransferCoefficient', 'U')).toBeCloseTo(2500, 9);
    expect(parseQuantity('2.5 kW/m2K', 'heatTransferCoefficient', 'U')).toBeCloseTo(2500, 9);
    // 1 Btu/(h·ft²·°F) = 5.678 263 W/(m²·K) (NIST SP 811 App. B, IT Btu)
    expect(parseQuantity('250 Btu/(h·ft²·°F)', 'heatTransferCoefficient', 'U')).toBeCloseTo(
      (250 * BTU) / 3600 / FT ** 2 / (5 / 9),
      9,
    );
    expect(parseQuantity('1 Btu/(h·ft²·°F)', 'heatTransferCoefficient', 'U')).toBeCloseTo(5.678263, 6);
  });
  it('converts areas and lengths', () => {
    expect(parseQuantity('100 ft²', 'area', 'A')).toBeCloseTo(100 * FT ** 2, 12);
    expect(parseQuantity('100 ft2', 'area', 'A')).toBeCloseTo(9.290304, 12);
    expect(parseQuantity(12, 'area', 'A')).toBe(12);
    expect(parseQuantity('2 ft', 'length', 'L')).toBeCloseTo(0.6096, 12);
    expect(parseQuantity('6 in', 'length', 'L')).toBeCloseTo(6 * IN, 12);
    expect(parseQuantity('1500 mm', 'length', 'L')).toBeCloseTo(1.5, 12);
  });
  it('converts power (default kW)', () => {
    expect(parseQuantity(250, 'power', 'Q')).toBeCloseTo(250_000, 9);
    expect(parseQuantity('1.5 MW', 'power', 'Q')).toBeCloseTo(1.5e6, 6);
    expect(parseQuantity('1000000 Btu/h', 'power', 'Q')).toBeCloseTo((1e6 * BTU) / 3600, 6);
  });
  it('converts density', () => {
    expect(parseQuantity(1050, 'density', 'rho')).toBe(1050);
    expect(parseQuantity('1.05 g/cm3', 'density', 'rho')).toBeCloseTo(1050, 9);
    expect(parseQuantity('62.4 lb/ft3', 'density', 'rho')).toBeCloseTo((62.4 * LB) / FT ** 3, 9);
  });
});

describe('parseQuantity: mass fraction', () => {
  it('reads fractions, percentages, Brix, g/kg and ppm', () => {
    expect(parseQuantity(0.3, 'massFraction', 'x')).toBe(0.3);
    expect(parseQuantity('65 %', 'massFraction', 'x')).toBeCloseTo(0.65, 12);
    expect(parseQuantity('65%', 'massFraction', 'x')).toBeCloseTo(0.65, 12);
    expect(parseQuantity('50 wt%', 'massFraction', 'x')).toBeCloseTo(0.5, 12);
    // °Bx: mass percent of sucrose (ICUMSA; common practice in sugar work)
    expect(parseQuantity('60 Bx', 'massFraction', 'x')).toBeCloseTo(0.6, 12);
    expect(parseQuantity('60 °Bx', 'massFraction', 'x')).toBeCloseTo(0.6, 12);
    expect(parseQuantity('35 g/kg', 'massFraction', 'x')).toBeCloseTo(0.035, 12);
    expect(parseQuantity('500 ppm', 'massFraction', 'x')).toBeCloseTo(5e-4, 15);
  });
  it('rejects a mass fraction above 1 with the valid range', () => {
    const e = unitError('120 %', 'massFraction');
    expect(e.message).toMatch(/between 0 and 1/);
    expect(unitError(1.2, 'massFraction').field).toBe('body.x');
  });
});

describe('parseQuantity: rejections carry field, input, kind and the accepted units', () => {
  it('rejects an empty string', () => {
    const e = unitError('   ', 'pressure', 'steam.pressure');
    expect(e.field).toBe('steam.pressure');
    expect(e.input).toBe('   ');
    expect(e.kind).toBe('pressure');
    expect(e.acceptedUnits).toEqual(acceptedUnits('pressure'));
    expect(e.acceptedUnits).toEqual(expect.arrayContaining(['kPa', 'bar', 'psi', 'barg', 'psig']));
  });
  it('rejects NaN and Infinity, as numbers and as text', () => {
    unitError(Number.NaN, 'pressure');
    unitError(Infinity, 'temperature');
    unitError('NaN', 'pressure');
    unitError('Infinity bar', 'pressure');
    unitError('1e999 bar', 'pressure');
  });
  it('rejects an unknown unit', () => {
    const e = unitError('3 furlongs', 'length');
    expect(e.message).toMatch(/unknown unit "furlongs"/);
    expect(e.message).toMatch(/m, mm, ft, in/);
  });
  it('rejects a unit of the wrong kind and says which kind it is', () => {
    const e = unitError('3 kg/s', 'pressure');
    expect(e.message).toMatch(/"kg\/s" is a mass flow unit, not a pressure unit/);
    expect(unitError('20 °C', 'pressure').message).toMatch(/temperature/);
  });
  it('rejects text that is not a number and a comma decimal', () => {
    unitError('bar', 'pressure');
    unitError('1,4 bar', 'pressure');
    unitError('about 3 bar', 'pressure');
  });
  it('rejects inputs that are neither numbers nor strings', () => {
    unitError({ value: 1 } as unknown as string, 'pressure');
  });
});

describe('formatOutput and defaultUnits', () => {
  it('gives results in the default output units', () => {
    expect(formatOutput(373.15, 'temperature')).toBeCloseTo(100, 12); // °C
    expect(formatOutput(ATM, 'pressure')).toBeCloseTo(101.325, 12); // kPa absolute
    expect(formatOutput(1.25, 'massFlow')).toBe(1.25); // kg/s
    expect(formatOutput(2.257e6, 'specificEnthalpy')).toBeCloseTo(2257, 9); // kJ/kg
    expect(formatOutput(4190, 'specificHeatCapacity')).toBeCloseTo(4.19, 12); // kJ/(kg·K)
    expect(formatOutput(250_000, 'power')).toBeCloseTo(250, 12); // kW
    expect(formatOutput(12, 'area')).toBe(12); // m²
    expect(formatOutput(1704, 'heatTransferCoefficient')).toBe(1704); // W/(m²·K)
    expect(formatOutput(0.5, 'massFraction')).toBe(0.5);
  });
  it('converts to another accepted unit on request', () => {
    expect(formatOutput(2e5 + ATM, 'pressure', 'barg')).toBeCloseTo(2, 12);
    expect(formatOutput(233.15, 'temperature', '°F')).toBeCloseTo(-40, 9);
    expect(() => formatOutput(1, 'pressure', 'kg/s')).toThrow(UnitError);
  });
  it('round-trips every accepted unit of every kind through SI', () => {
    for (const kind of quantityKinds) {
      for (const unit of acceptedUnits(kind)) {
        const si = parseQuantity(`0.5 ${unit}`, kind, 'x');
        expect(formatOutput(si, kind, unit)).toBeCloseTo(0.5, 9);
      }
    }
  });
  it('documents a default unit for every kind', () => {
    expect(Object.keys(defaultUnits).sort()).toEqual([...quantityKinds].sort());
    expect(defaultUnits).toMatchObject({
      pressure: 'kPa',
      temperature: '°C',
      power: 'kW',
      specificHeatCapacity: 'kJ/(kg·K)',
    });
  });
});

describe('default-unit conversions used for every API field', () => {
  it('match the exact definitions of the default units and invert each other', () => {
    // Exact definitions (SI brochure; common practice): 0 °C = 273.15 K, 1 kPa = 1000 Pa,
    // 1 kJ/kg = 1000 J/kg, 1 kW = 1000 W.
    expect(fromDefaultUnit(0, 'temperature')).toBe(273.15);
    expect(toDefaultUnit(373.15, 'temperature')).toBeCloseTo(100, 12);
    expect(fromDefaultUnit(101.325, 'pressure')).toBeCloseTo(101_325, 9);
    expect(fromDefaultUnit(2257, 'specificEnthalpy')).toBe(2_257_000);
    expect(toDefaultUnit(1500, 'power')).toBe(1.5);
    for (const kind of quantityKinds) {
      expect(toDefaultUnit(fromDefaultUnit(0.5, kind), kind)).toBeCloseTo(0.5, 12);
      // the same default unit as parseQuantity reads a plain number in
      expect(fromDefaultUnit(0.5, kind)).toBe(parseQuantity(0.5, kind, 'f'));
    }
  });
});
