/**
 * The IF97 adapter against the verification tables printed in the IAPWS releases.
 *
 * Table values: IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for
 * the Thermodynamic Properties of Water and Steam". They were recalled from memory and then
 * checked digit for digit against independent public reproductions of the tables read for this
 * test (the freesteam IF97 library's test suite, which reproduces Tables 5, 7, 15, 24, 33, 35
 * and its R12-08 viscosity table; another project's reproduction of Tables 5, 15, 33, 35, 36 and
 * 42); R12-08 Table 4 and R15-11 Table 4 likewise (the python-iapws and CoolProp test suites
 * reproduce them). "9 significant figures" = the printed digits: we require |rel. error| ≤ 5e-9,
 * i.e. half a unit in the ninth figure (a few values need the allowance explained beside them).
 */
import { describe, expect, it } from 'vitest';
import {
  backwardTemperatureRegion1,
  backwardTemperatureRegion2,
  region3StateAtDensity,
  saturationPressure,
  saturationTemperature,
  stateAtPH,
  stateAtPT,
  thermalConductivityAtDensity,
  viscosityAtDensity,
  type WaterState,
} from '../../../server/engine/steam/if97.js';

const MPA = 1e6;
const KJ = 1e3;

/** Relative agreement to half a unit in the 9th significant figure of a value printed with 9. */
function expectNineFigures(actual: number, printed: number): void {
  expect(Math.abs(actual / printed - 1)).toBeLessThanOrEqual(5e-9 + 1e-15);
}

type Row = [number, number, number, number, number, number, number, number];

function checkRow(s: WaterState, row: Row): void {
  const [, , v, h, u, sEnt, cp, w] = row;
  expectNineFigures(s.specificVolume, v);
  expectNineFigures(s.enthalpy, h * KJ);
  expectNineFigures(s.internalEnergy, u * KJ);
  expectNineFigures(s.entropy, sEnt * KJ);
  expectNineFigures(s.heatCapacity ?? NaN, cp * KJ);
  expectNineFigures(s.speedOfSound ?? NaN, w);
}

describe('IF97 forward equations reproduce the R7-97(2012) verification tables', () => {
  // [T K, p MPa, v m³/kg, h kJ/kg, u kJ/kg, s kJ/(kg K), cp kJ/(kg K), w m/s]
  // Source: IAPWS R7-97(2012) Table 5 (region 1).
  const table5: Row[] = [
    [300, 3, 0.100215168e-2, 0.115331273e3, 0.112324818e3, 0.392294792, 0.417301218e1, 0.150773921e4],
    [300, 80, 0.971180894e-3, 0.184142828e3, 0.106448356e3, 0.368563852, 0.401008987e1, 0.163469054e4],
    [500, 3, 0.1202418e-2, 0.975542239e3, 0.971934985e3, 0.258041912e1, 0.465580682e1, 0.124071337e4],
  ];
  // Source: IAPWS R7-97(2012) Table 15 (region 2).
  const table15: Row[] = [
    [300, 0.0035, 0.394913866e2, 0.254991145e4, 0.24116916e4, 0.852238967e1, 0.191300162e1, 0.427920172e3],
    [700, 0.0035, 0.923015898e2, 0.333568375e4, 0.301262819e4, 0.101749996e2, 0.208141274e1, 0.644289068e3],
    [700, 30, 0.542946619e-2, 0.263149474e4, 0.246861076e4, 0.517540298e1, 0.103505092e2, 0.480386523e3],
  ];
  // Source: IAPWS R7-97(2012) Table 42 (region 5).
  const table42: Row[] = [
    [1500, 0.5, 0.13845509e1, 0.521976855e4, 0.45274931e4, 0.965408875e1, 0.261609445e1, 0.91706869e3],
    [1500, 30, 0.230761299e-1, 0.516723514e4, 0.447495124e4, 0.772970133e1, 0.272724317e1, 0.928548002e3],
    [2000, 30, 0.311385219e-1, 0.657122604e4, 0.563707038e4, 0.853640523e1, 0.288569882e1, 0.106736948e4],
  ];

  it.each(table5)('region 1 at %d K, %d MPa matches Table 5 to the printed digits', (...row) => {
    const s = stateAtPT(row[1] * MPA, row[0]);
    expect(s.region).toBe(1);
    checkRow(s, row as Row);
  });

  it.each(table15)('region 2 at %d K, %d MPa matches Table 15 to the printed digits', (...row) => {
    const s = stateAtPT(row[1] * MPA, row[0]);
    expect(s.region).toBe(2);
    checkRow(s, row as Row);
  });

  it.each(table42)('region 5 at %d K, %d MPa matches Table 42 to the printed digits', (...row) => {
    const s = stateAtPT(row[1] * MPA, row[0]);
    expect(s.region).toBe(5);
    checkRow(s, row as Row);
  });

  // [T K, ρ kg/m³, p MPa, h, u, s, cp, w]. Source: IAPWS R7-97(2012) Table 33 (region 3).
  const table33: Row[] = [
    [650, 500, 0.255837018e2, 0.186343019e4, 0.181226279e4, 0.405427273e1, 0.138935717e2, 0.502005554e3],
    [650, 200, 0.222930643e2, 0.237512401e4, 0.226365868e4, 0.485438792e1, 0.446579342e2, 0.383444594e3],
    [750, 500, 0.783095639e2, 0.225868845e4, 0.210206932e4, 0.446971906e1, 0.634165359e1, 0.760696041e3],
  ];
  it.each(table33)('region 3 at %d K, %d kg/m³ matches Table 33 to the printed digits', (...row) => {
    const [T, rho, p, h, u, sEnt, cp, w] = row as Row;
    const s = region3StateAtDensity(rho, T);
    expectNineFigures(s.pressure, p * MPA);
    expectNineFigures(s.enthalpy, h * KJ);
    expectNineFigures(s.internalEnergy, u * KJ);
    expectNineFigures(s.entropy, sEnt * KJ);
    expectNineFigures(s.heatCapacity ?? NaN, cp * KJ);
    expectNineFigures(s.speedOfSound ?? NaN, w);
  });

  it.each(table33)(
    'region 3 (p, T) inverts Table 33: at %d K the printed p gives back %d kg/m³',
    (...row) => {
      const [T, rho, p] = row as Row;
      // Source: Table 33 read backwards. p is printed to 9 figures, so ρ can only come back to
      // about (∂ρ/∂p)·Δp: 2e-8 relative at 650 K / 200 kg/m³ where the isotherm is flat; allow 1e-7.
      const s = stateAtPT(p * MPA, T);
      expect(s.region).toBe(3);
      expect(Math.abs(s.density / rho - 1)).toBeLessThan(1e-7);
    },
  );

  // Source: IAPWS R7-97(2012) Table 35 (saturation pressure, eq. 30).
  it.each([
    [300, 0.353658941e-2],
    [500, 0.263889776e1],
    [600, 0.123443146e2],
  ])('saturation pressure at %d K is %d MPa (Table 35)', (T, p) => {
    expectNineFigures(saturationPressure(T), p * MPA);
  });

  // Source: IAPWS R7-97(2012) Table 36 (saturation temperature, eq. 31).
  it.each([
    [0.1, 0.372755919e3],
    [1, 0.453035632e3],
    [10, 0.584149488e3],
  ])('saturation temperature at %d MPa is %d K (Table 36)', (p, T) => {
    expectNineFigures(saturationTemperature(p * MPA), T);
  });
});

describe('the package backward equations T(p, h) reproduce Tables 7 and 24, and the adapter refines them', () => {
  // [p MPa, h kJ/kg, T K]. Source: IAPWS R7-97(2012) Table 7 (region 1, eq. 11).
  const table7: [number, number, number][] = [
    [3, 500, 0.391798509e3],
    [80, 500, 0.378108626e3],
    [80, 1500, 0.611041229e3],
  ];
  // Source: IAPWS R7-97(2012) Table 24 (region 2, eqs. 22–24).
  const table24: [number, number, number][] = [
    [0.001, 3000, 0.534433241e3],
    [3, 3000, 0.57537337e3],
    [3, 4000, 0.101077577e4],
    [5, 3500, 0.801299102e3],
    [5, 4000, 0.101531583e4],
    [25, 3500, 0.875279054e3],
    [40, 2700, 0.743056411e3],
    [60, 2700, 0.791137067e3],
    [60, 3200, 0.88275686e3],
  ];

  it.each(table7)('raw region-1 T(%d MPa, %d kJ/kg) matches Table 7', (p, h, T) => {
    expectNineFigures(backwardTemperatureRegion1(p * MPA, h * KJ), T);
  });

  it.each(table24)('raw region-2 T(%d MPa, %d kJ/kg) matches Table 24', (p, h, T) => {
    expectNineFigures(backwardTemperatureRegion2(p * MPA, h * KJ), T);
  });

  it.each([...table7, ...table24])(
    'refined state at (%d MPa, %d kJ/kg) reproduces h exactly and T within the backward tolerance',
    (p, h, T) => {
      const s = stateAtPH(p * MPA, h * KJ);
      // The refined state satisfies the forward equation: h to 1e-9 relative (our own requirement).
      expect(Math.abs(s.enthalpy / (h * KJ) - 1)).toBeLessThan(1e-9);
      // R7-97(2012) permits the backward T(p, h) to differ from the forward inverse by at most
      // 25 mK (region 1; tighter in region 2) (from memory), so the printed T is that close.
      expect(Math.abs(s.temperature - T)).toBeLessThan(0.025);
    },
  );
});

describe('transport properties reproduce the IAPWS check values the package implements', () => {
  // [T K, ρ kg/m³, μ µPa·s]. Source: IAPWS R12-08 Table 4 (μ2 = 1).
  it.each([
    [298.15, 998, 889.7351],
    [298.15, 1200, 1437.649467],
    [373.15, 1000, 307.883622],
    [433.15, 1, 14.538324],
    [433.15, 1000, 217.685358],
    [873.15, 1, 32.619287],
    [873.15, 100, 35.802262],
    [873.15, 600, 77.430195],
    [1173.15, 1, 44.217245],
    [1173.15, 100, 47.640433],
    [1173.15, 400, 64.154608],
  ])('viscosity at %d K, %d kg/m³ is %d µPa·s (R12-08 Table 4)', (T, rho, mu) => {
    // Printed with 6 decimals: half a unit of the last printed digit, relative to the smallest
    // value (14.538324), is 3.4e-8; require 5e-8.
    expect(Math.abs(viscosityAtDensity(T, rho) / (mu * 1e-6) - 1)).toBeLessThan(5e-8);
  });

  // [T K, ρ kg/m³, λ mW/(m·K)]. Source: IAPWS R15-11 Table 4 (points where λ2 = 0).
  it.each([
    [298.15, 0, 18.4341883],
    [298.15, 998, 607.712868],
    [298.15, 1200, 799.038144],
    [873.15, 0, 79.1034659],
  ])('thermal conductivity at %d K, %d kg/m³ is %d mW/(m·K) (R15-11 Table 4)', (T, rho, k) => {
    expectNineFigures(thermalConductivityAtDensity(T, rho), k * 1e-3);
  });

  it('omits the R15-11 critical enhancement, so near-critical conductivity is below the Table 5 value', () => {
    // Source: IAPWS R15-11 Table 5: λ(647.35 K, 322 kg/m³) = 1443.75556 mW/(m·K) with λ2. The
    // package has no λ2, so it must come out far lower; this documents the known limitation.
    expect(thermalConductivityAtDensity(647.35, 322)).toBeLessThan(0.5 * 1.44375556);
  });
});
