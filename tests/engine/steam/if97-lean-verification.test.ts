/**
 * The lean IF97 core (server/engine/steam/if97-lean.ts) against the verification tables printed in
 * IAPWS R7-97(2012), "Revised Release on the IAPWS Industrial Formulation 1997 for the
 * Thermodynamic Properties of Water and Steam".
 *
 * Tables 5, 7, 15, 24, 35 and 36: the values of tests/engine/steam/if97-verification.test.ts (read
 * there against independent reproductions of the tables). Tables 9 and 29 (T(p, s)) and the B23 and
 * B2bc check values: from memory, each confirmed to its printed digits by python3-iapws 1.5.2's
 * backward functions (iapws.iapws97._Backward1_T_Ps, _Backward2_T_Ps, _P23_T, _P_2bc), which use
 * the release's coefficients. "Printed digits": 9 significant figures, so |relative error| ≤ 5e-9.
 */
import { describe, expect, it } from 'vitest';
import {
  b23Pressure,
  b23Temperature,
  b2bcEnthalpy,
  b2bcPressure,
  leanProperties,
  region1Enthalpy,
  region1Properties,
  region1TemperaturePH,
  region1TemperaturePS,
  region2Enthalpy,
  region2Properties,
  region2TemperaturePH,
  region2TemperaturePS,
  saturationPressureLean,
  saturationTemperatureLean,
} from '../../../server/engine/steam/if97-lean.js';

const MPA = 1e6;
const KJ = 1e3;

function expectNineFigures(actual: number, printed: number): void {
  expect(Math.abs(actual / printed - 1)).toBeLessThanOrEqual(5e-9 + 1e-15);
}

type Row = [number, number, number, number, number, number, number, number];

describe('lean forward equations reproduce R7-97(2012) Tables 5 and 15', () => {
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

  function check(props: ReturnType<typeof leanProperties>, row: Row): void {
    const [, , v, h, u, s, cp, w] = row;
    expectNineFigures(props.v, v);
    expectNineFigures(props.h, h * KJ);
    expectNineFigures(props.u, u * KJ);
    expectNineFigures(props.s, s * KJ);
    expectNineFigures(props.cp, cp * KJ);
    expectNineFigures(props.w, w);
  }

  it.each(table5)('region 1 at %d K, %d MPa: v, h, u, s, cp, w as printed in Table 5', (...row) => {
    const [T, p] = row as Row;
    check(region1Properties(p * MPA, T, leanProperties()), row as Row);
    // The enthalpy-only path evaluates the same sum.
    expectNineFigures(region1Enthalpy(p * MPA, T), (row as Row)[3] * KJ);
  });

  it.each(table15)('region 2 at %d K, %d MPa: v, h, u, s, cp, w as printed in Table 15', (...row) => {
    const [T, p] = row as Row;
    check(region2Properties(p * MPA, T, leanProperties()), row as Row);
    expectNineFigures(region2Enthalpy(p * MPA, T), (row as Row)[3] * KJ);
  });
});

describe('lean saturation line reproduces R7-97(2012) Tables 35 and 36', () => {
  // Source: IAPWS R7-97(2012) Table 35 (eq. 30).
  it.each([
    [300, 0.353658941e-2],
    [500, 0.263889776e1],
    [600, 0.123443146e2],
  ])('p_s(%d K) is %d MPa', (T, p) => {
    expectNineFigures(saturationPressureLean(T), p * MPA);
  });

  // Source: IAPWS R7-97(2012) Table 36 (eq. 31).
  it.each([
    [0.1, 0.372755919e3],
    [1, 0.453035632e3],
    [10, 0.584149488e3],
  ])('T_s(%d MPa) is %d K', (p, T) => {
    expectNineFigures(saturationTemperatureLean(p * MPA), T);
  });
});

describe('lean boundary equations reproduce the release check values', () => {
  it('B23: 623.15 K and 16.5291643 MPa map onto each other (eqs. 5 and 6)', () => {
    // Source: R7-97(2012) section 4, the check value beside eqs. 5 and 6 (from memory;
    // python3-iapws _P23_T(623.15) = 16.5291642526 MPa).
    expectNineFigures(b23Pressure(623.15), 0.165291643e2 * MPA);
    expectNineFigures(b23Temperature(0.165291643e2 * MPA), 0.62315e3);
  });

  it('B2bc: 100 MPa and 3516.004323 kJ/kg map onto each other (eqs. 20 and 21)', () => {
    // Source: R7-97(2012) section 6.3.1, the check value beside eqs. 20 and 21 (from memory;
    // python3-iapws _P_2bc(3516.004323) = 100.000000 MPa).
    expect(Math.abs(b2bcPressure(0.3516004323e4 * KJ) / (100 * MPA) - 1)).toBeLessThan(5e-9);
    expect(Math.abs(b2bcEnthalpy(100 * MPA) / (0.3516004323e4 * KJ) - 1)).toBeLessThan(5e-10);
  });
});

describe('lean backward equations reproduce R7-97(2012) Tables 7, 9, 24 and 29', () => {
  // [p MPa, h kJ/kg, T K]. Source: IAPWS R7-97(2012) Table 7 (region 1, eq. 11).
  it.each([
    [3, 500, 0.391798509e3],
    [80, 500, 0.378108626e3],
    [80, 1500, 0.611041229e3],
  ])('region 1 T(%d MPa, %d kJ/kg) as printed in Table 7', (p, h, T) => {
    expectNineFigures(region1TemperaturePH(p * MPA, h * KJ), T);
  });

  // Source: IAPWS R7-97(2012) Table 24 (region 2, eqs. 22–24: 2a at 0.001 and 3 MPa, 2b at 5 and
  // 25 MPa, 2c at 40 and 60 MPa).
  it.each([
    [0.001, 3000, 0.534433241e3],
    [3, 3000, 0.57537337e3],
    [3, 4000, 0.101077577e4],
    [5, 3500, 0.801299102e3],
    [5, 4000, 0.101531583e4],
    [25, 3500, 0.875279054e3],
    [40, 2700, 0.743056411e3],
    [60, 2700, 0.791137067e3],
    [60, 3200, 0.88275686e3],
  ])('region 2 T(%d MPa, %d kJ/kg) as printed in Table 24', (p, h, T) => {
    expectNineFigures(region2TemperaturePH(p * MPA, h * KJ), T);
  });

  // [p MPa, s kJ/(kg K), T K]. Source: IAPWS R7-97(2012) Table 9 (region 1, eq. 13), from memory,
  // confirmed by python3-iapws _Backward1_T_Ps: 307.8422576, 309.9797848, 565.8999088 K.
  it.each([
    [3, 0.5, 0.307842258e3],
    [80, 0.5, 0.309979785e3],
    [80, 3, 0.565899909e3],
  ])('region 1 T(%d MPa, %d kJ/(kg K)) as printed in Table 9', (p, s, T) => {
    expectNineFigures(region1TemperaturePS(p * MPA, s * KJ), T);
  });

  // Source: IAPWS R7-97(2012) Table 29 (region 2, eqs. 25–27), from memory, confirmed by
  // python3-iapws _Backward2_T_Ps to the printed digits.
  it.each([
    [0.1, 7.5, 0.399517097e3],
    [0.1, 8, 0.514127081e3],
    [2.5, 8, 0.103984917e4],
    [8, 6, 0.60048404e3],
    [8, 7.5, 0.106495556e4],
    [90, 6, 0.103801126e4],
    [20, 5.75, 0.697992849e3],
    [80, 5.25, 0.854011484e3],
    [80, 5.75, 0.949017998e3],
  ])('region 2 T(%d MPa, %d kJ/(kg K)) as printed in Table 29', (p, s, T) => {
    expectNineFigures(region2TemperaturePS(p * MPA, s * KJ), T);
  });
});
