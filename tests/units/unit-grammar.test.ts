/**
 * Units as engineers type them: every spelling the API promises (and the ones it refuses), each
 * converted value checked against an SI value computed by hand from a named definition:
 * NIST Special Publication 811 (2008), Appendix B (1 lb = 0.45359237 kg, 1 ft = 0.3048 m,
 * 1 in = 0.0254 m, 1 Btu_IT = 1055.05585262 J, 1 psi = 6894.757 Pa, 1 inHg (conventional) =
 * 3386.389 Pa, 1 short ton = 2000 lb = 907.18474 kg, 1 BTU/(h·ft²·°F) = 5.678263 W/(m²·K)),
 * 1 bar = 1e5 Pa and 1 atm = 101 325 Pa (exact), and "common practice" for plant readings
 * (gauge and vacuum against the atmosphere, ppt of salinity as g/kg, t/T as metric tonnes).
 */
import { describe, expect, it } from 'vitest';
import { parseQuantity, UnitError, type QuantityKind } from '../../server/units/index.js';

const LB = 0.45359237; // kg, NIST SP 811
const HOUR = 3600; // s
const ATM = 101_325; // Pa, exact
const INHG = 3386.389; // Pa, NIST SP 811 (conventional inch of mercury), 7 digits
const HTC_BTU = 5.678263; // W/(m²·K) per BTU/(h·ft²·°F), NIST SP 811, 7 digits
const PSI = 6894.757; // Pa, NIST SP 811, 7 digits

interface Row {
  input: string;
  kind: QuantityKind;
  si: number;
  /** Relative tolerance: 1e-12 for exact factors, 1e-6 where the source gives 7 digits. */
  rel: number;
  source: string;
}

const accepted: Row[] = [
  // heat-transfer coefficients
  {
    input: '1.2 kW/(m^2 K)',
    kind: 'heatTransferCoefficient',
    si: 1200,
    rel: 1e-12,
    source: 'SI prefix k = 1e3',
  },
  { input: '1200 W/m2-K', kind: 'heatTransferCoefficient', si: 1200, rel: 1e-12, source: 'identity' },
  { input: '1200 W/(m2.K)', kind: 'heatTransferCoefficient', si: 1200, rel: 1e-12, source: 'identity' },
  { input: '1.2 kW/m2/K', kind: 'heatTransferCoefficient', si: 1200, rel: 1e-12, source: 'SI prefix k' },
  { input: '1200 W/m^2 K', kind: 'heatTransferCoefficient', si: 1200, rel: 1e-12, source: 'identity' },
  { input: '1200 W/m² K', kind: 'heatTransferCoefficient', si: 1200, rel: 1e-12, source: 'identity' },
  { input: '1200 W per m2 K', kind: 'heatTransferCoefficient', si: 1200, rel: 1e-12, source: 'identity' },
  { input: '1.8 kW/(m2*K)', kind: 'heatTransferCoefficient', si: 1800, rel: 1e-12, source: 'SI prefix k' },
  { input: '1500 W/(m2*K)', kind: 'heatTransferCoefficient', si: 1500, rel: 1e-12, source: 'identity' },
  { input: '1500 W/(m²·K)', kind: 'heatTransferCoefficient', si: 1500, rel: 1e-12, source: 'identity' },
  {
    input: '250 BTU/(h ft2 F)',
    kind: 'heatTransferCoefficient',
    si: 250 * HTC_BTU,
    rel: 1e-6,
    source: 'NIST SP 811',
  },
  {
    input: '250 btu/(HR FT2 F)',
    kind: 'heatTransferCoefficient',
    si: 250 * HTC_BTU,
    rel: 1e-6,
    source: 'NIST SP 811, case-insensitive names',
  },
  {
    input: '1 BTU/hr-ft2-F',
    kind: 'heatTransferCoefficient',
    // From the definitions (Btu_IT, ft, °F = 5/9 K), exact, not js-quantities' rounded 1055.056 J.
    si: 1055.05585262 / HOUR / 0.3048 ** 2 / (5 / 9),
    rel: 1e-12,
    source: 'NIST SP 811 definitions',
  },
  {
    input: '1 Btu/hr-ft²-°F',
    kind: 'heatTransferCoefficient',
    si: HTC_BTU,
    rel: 1e-6,
    source: 'NIST SP 811',
  },
  // mass flows
  { input: '60 kg/min', kind: 'massFlow', si: 1, rel: 1e-12, source: '1 min = 60 s' },
  { input: '86.4 t/d', kind: 'massFlow', si: 1, rel: 1e-12, source: '1 t = 1000 kg, 1 d = 86 400 s' },
  {
    input: '3.6 klb/h',
    kind: 'massFlow',
    si: (3600 * LB) / HOUR,
    rel: 1e-12,
    source: 'NIST SP 811: 1 lb = 0.45359237 kg',
  },
  {
    input: '3.6 T/h',
    kind: 'massFlow',
    si: 1,
    rel: 1e-12,
    source: 'common practice: T/h is metric tonnes per hour',
  },
  { input: '4.5 t/h', kind: 'massFlow', si: 1.25, rel: 1e-12, source: '1 t/h = 1/3.6 kg/s' },
  { input: '4.5 tonne/hr', kind: 'massFlow', si: 1.25, rel: 1e-12, source: '1 t/h = 1/3.6 kg/s' },
  { input: '3600 lb/h', kind: 'massFlow', si: LB, rel: 1e-12, source: 'NIST SP 811' },
  {
    input: '1 short ton/h',
    kind: 'massFlow',
    si: 907.18474 / HOUR,
    rel: 1e-12,
    source: 'NIST SP 811: short ton = 907.18474 kg',
  },
  { input: '1 short tons per hr', kind: 'massFlow', si: 907.18474 / HOUR, rel: 1e-12, source: 'NIST SP 811' },
  // pressures (absolute, gauge, vacuum)
  { input: '1.4 bar', kind: 'pressure', si: 1.4e5, rel: 1e-12, source: '1 bar = 1e5 Pa' },
  { input: '1.4 bar(a)', kind: 'pressure', si: 1.4e5, rel: 1e-12, source: '1 bar = 1e5 Pa' },
  { input: '1.4 bara', kind: 'pressure', si: 1.4e5, rel: 1e-12, source: '1 bar = 1e5 Pa' },
  { input: '1.4 BARA', kind: 'pressure', si: 1.4e5, rel: 1e-12, source: '1 bar = 1e5 Pa, case-insensitive' },
  { input: '2 barg', kind: 'pressure', si: 2e5 + ATM, rel: 1e-12, source: 'common practice: gauge + 1 atm' },
  {
    input: '-0.8 barg',
    kind: 'pressure',
    si: ATM - 0.8e5,
    rel: 1e-12,
    source: 'common practice: gauge + 1 atm',
  },
  { input: '20 psig', kind: 'pressure', si: 20 * PSI + ATM, rel: 1e-6, source: 'NIST SP 811 + 1 atm' },
  { input: '20 psia', kind: 'pressure', si: 20 * PSI, rel: 1e-6, source: 'NIST SP 811' },
  { input: '150 kPa(a)', kind: 'pressure', si: 150_000, rel: 1e-12, source: 'SI prefix k' },
  { input: '150 mbar', kind: 'pressure', si: 15_000, rel: 1e-12, source: '1 mbar = 100 Pa' },
  {
    input: '100 mmHg',
    kind: 'pressure',
    si: 13_332.2387415,
    rel: 1e-9,
    source: 'NIST SP 811: 133.322387415 Pa',
  },
  { input: '25 inHg(a)', kind: 'pressure', si: 25 * INHG, rel: 1e-6, source: 'NIST SP 811' },
  { input: '25 inHg abs', kind: 'pressure', si: 25 * INHG, rel: 1e-6, source: 'NIST SP 811' },
  {
    input: '25 inHg vac',
    kind: 'pressure',
    si: ATM - 25 * INHG,
    rel: 1e-6,
    source: 'common practice: vacuum below 1 atm',
  },
  // mass fractions
  { input: '65 %', kind: 'massFraction', si: 0.65, rel: 1e-12, source: 'percent' },
  { input: '50 wt%', kind: 'massFraction', si: 0.5, rel: 1e-12, source: 'percent by mass' },
  { input: '50 wt.%', kind: 'massFraction', si: 0.5, rel: 1e-12, source: 'percent by mass' },
  {
    input: '35 ppt',
    kind: 'massFraction',
    si: 0.035,
    rel: 1e-12,
    source: 'common practice: salinity ppt = g/kg',
  },
  {
    input: '60 Bx',
    kind: 'massFraction',
    si: 0.6,
    rel: 1e-12,
    source: 'ICUMSA: °Brix = sucrose mass percent',
  },
  // temperatures
  { input: '212 F', kind: 'temperature', si: 373.15, rel: 1e-12, source: 'T/K = (t/°F + 459.67)·5/9' },
  { input: '212 degF', kind: 'temperature', si: 373.15, rel: 1e-12, source: 'T/K = (t/°F + 459.67)·5/9' },
  { input: '100 degC', kind: 'temperature', si: 373.15, rel: 1e-12, source: 'T/K = t/°C + 273.15' },
  { input: '373.15 K', kind: 'temperature', si: 373.15, rel: 1e-12, source: 'identity' },
  // other kinds through the grammar
  { input: '1 BTU/lb', kind: 'specificEnthalpy', si: 1055.05585262 / LB, rel: 1e-12, source: 'NIST SP 811' },
  { input: '3.9 kJ/kg-K', kind: 'specificHeatCapacity', si: 3900, rel: 1e-12, source: 'SI prefix k' },
  { input: '1 lb/ft3', kind: 'density', si: LB / 0.3048 ** 3, rel: 1e-12, source: 'NIST SP 811' },
];

describe('units engineers type are read to SI', () => {
  it.each(accepted)('reads "$input" as $kind ($source)', ({ input, kind, si, rel }) => {
    const got = parseQuantity(input, kind, 'f', { liquor: 'sucrose' });
    expect(Math.abs(got - si) / Math.abs(si)).toBeLessThanOrEqual(rel);
  });
});

function refusal(
  input: string | number,
  kind: QuantityKind,
  context?: Parameters<typeof parseQuantity>[3],
): string {
  try {
    parseQuantity(input, kind, 'feed.x', context);
  } catch (e) {
    expect(e).toBeInstanceOf(UnitError);
    return (e as UnitError).message;
  }
  throw new Error(`"${String(input)}" was accepted as a ${kind}`);
}

describe('ambiguous or misplaced units are refused with a hint', () => {
  it('refuses a bare inHg, pointing at inHg(a) and inHg vac', () => {
    const m = refusal('25 inHg', 'pressure');
    expect(m).toMatch(/^feed\.x: .*ambiguous/);
    expect(m).toContain('inHg(a)');
    expect(m).toContain('inHg vac');
  });
  it('refuses a bare ton, pointing at t/h and short ton/h', () => {
    const m = refusal('10 ton/h', 'massFlow');
    expect(m).toContain('"t/h"');
    expect(m).toContain('short ton/h');
  });
  it('refuses °Bx for a caustic liquor, naming the field and the liquor it fits', () => {
    const m = refusal('60 Bx', 'massFraction', { liquor: 'sodium-hydroxide' });
    expect(m).toMatch(/^feed\.x: "°Bx" does not fit this liquor \(sodium-hydroxide\)/);
    expect(m).toContain('sucrose');
  });
  it('refuses a bare 60 as a mass fraction with the percent hint', () => {
    expect(refusal('60', 'massFraction')).toContain('did you mean 60 % (0.6)?');
  });
  it('refuses a gauge reading as the atmosphere itself', () => {
    expect(refusal('0 barg', 'pressure', { absoluteOnly: true })).toMatch(/absolute pressure/);
  });
  it('refuses a unit of another kind, naming that kind', () => {
    expect(refusal('1200 W/m2-K', 'pressure')).toContain('heat transfer coefficient unit');
  });
  it('refuses "/" inside parentheses and unknown atoms rather than guessing', () => {
    expect(refusal('1 W/(m2/K)', 'heatTransferCoefficient')).toContain('unknown unit');
    expect(refusal('1 W/m2-Kelvinish', 'heatTransferCoefficient')).toContain('unknown unit');
  });
  it('keeps the case of a prefix: mW is not MW', () => {
    expect(refusal('1 mW', 'power')).toContain('unknown unit');
    expect(parseQuantity('1 MW', 'power', 'p')).toBe(1e6); // SI prefix M = 1e6
  });
});

describe('gauge and vacuum readings refer to the stated atmosphere', () => {
  it('adds a stated atmosphere to barg and psig (common practice)', () => {
    expect(parseQuantity('2 barg', 'pressure', 'p', { atmosphere: 95_000 })).toBeCloseTo(295_000, 9);
    expect(parseQuantity('20 psig', 'pressure', 'p', { atmosphere: 95_000 })).toBeCloseTo(
      95_000 + 20 * PSI,
      1,
    );
  });
  it('takes inHg vac from a stated atmosphere (common practice)', () => {
    expect(parseQuantity('25 inHg vac', 'pressure', 'p', { atmosphere: 95_000 })).toBeCloseTo(
      95_000 - 25 * INHG,
      1,
    );
  });
  it('leaves absolute readings alone', () => {
    expect(parseQuantity('25 inHg(a)', 'pressure', 'p', { atmosphere: 95_000 })).toBeCloseTo(25 * INHG, 1);
  });
});
