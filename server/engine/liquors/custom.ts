/**
 * Custom liquors built from data the user supplies (uploaded tables, textbook polynomials).
 * All inputs are SI: K, J/kg, J/(kg·K), mass fraction of solute 0–1 (the API converts units
 * before calling). A custom liquor is a {@link LiquorModel} of kind "custom"; it belongs to a
 * request or an account and is never registered with the built-in models.
 *
 * Three kinds of definition (a discriminated union on which boiling-point key is present):
 *
 * (a) Dühring table, `boilingPoint.duhring`: for each concentration, pairs of (boiling point of
 *     water, boiling point of the solution) at the same pressure. Dühring's rule: at fixed x the
 *     solution's boiling point is linear in that of water, T = a(x) + b(x)·T_w. Each line is a
 *     least-squares fit (exact for two points; a "duhring-fit-deviation" warning when a point
 *     lies more than 0.5 K off its line). Between tabulated concentrations a and b are
 *     interpolated linearly in x; below the lowest concentration the line is interpolated towards
 *     pure water (a = 0, b = 1 at x = 0) unless the table has its own x = 0 line.
 *     Source: U. Dühring, "Neue Grundgesetze zur rationellen Physik und Chemie", Leipzig, 1878;
 *     the rule as used in evaporator design: W. L. McCabe, J. C. Smith, P. Harriott, "Unit
 *     Operations of Chemical Engineering", McGraw-Hill, chapter on evaporation.
 * (b) Polynomial, `boilingPointRise.polynomial`: BPR(x) = Σ c_i·x^i in K, independent of pressure,
 *     with `heatCapacity.polynomial`: c_p(x) = Σ d_i·x^i in J/(kg·K), and enthalpy
 *     h(x, T) = c_p(x)·(T − 273.16 K): the steam-table datum (liquid water at the triple point,
 *     0.01 °C, has h = 0). The heat of solution (of dilution) is neglected, as the textbook
 *     method does (e.g. C. J. Geankoplis, "Transport Processes and Separation Process
 *     Principles", 4th ed., Prentice Hall, 2003, section 8.4).
 * (c) Either of those with `enthalpy.table`: for each concentration, (T, h) points on the
 *     steam-table datum, interpolated bilinearly (linear in T within a concentration, linear in x
 *     between concentrations; below the lowest concentration towards saturated liquid water from
 *     IAPWS-IF97 unless the table has an x = 0 row). It replaces the c_p-based enthalpy, and gives
 *     c_p as the slope ∂h/∂T when no c_p polynomial is given.
 *
 * Optional transport properties, each a polynomial in x over the liquor's mass-fraction range
 * (validated like the c_p polynomial: positive over the range plus its margin), independent of
 * temperature except viscosity; absent, the property is simply not provided:
 * - `density.polynomial`: ρ(x) = Σ c_i·x^i, kg/m³;
 * - `viscosity.polynomial`: relative viscosity, μ(x, T) = μ_water(T)·Σ c_i·x^i with μ_water from
 *   IAPWS R12-08 at T (saturated liquid), so a liquor follows water's steep fall with temperature
 *   (c_0 = 1 for a liquor that tends to water);
 * - `thermalConductivity.polynomial`: k(x) = Σ c_i·x^i, W/(m·K);
 * - `surfaceTension.polynomial`: σ(x) = Σ c_i·x^i, N/m.
 *
 * Decisions (documented in the API description as well):
 * - Extrapolation margins. Mass fraction: up to {@link MASS_FRACTION_MARGIN} (absolute) beyond the
 *   data, the end lines/polynomials are extrapolated with a "model-extrapolated" warning; further
 *   out, an EngineRangeError. Temperature (water boiling point of the Dühring lines, temperatures
 *   of the enthalpy table, a stated temperature validity): up to {@link TEMPERATURE_MARGIN} beyond
 *   the data with a warning, then an EngineRangeError. For a Dühring liquor the water boiling
 *   point is checked as the pressure it corresponds to (field "pressure", Pa).
 * - A tabulated boiling point may lie up to {@link BPR_TOLERANCE} below that of water (reading
 *   noise of charts); a fitted line or polynomial may not dip further below.
 * - Adjacent Dühring lines (and adjacent enthalpy rows) must share part of their temperature
 *   range: interpolating between two lines that share no data range rests on no data.
 * - Dühring lines must not cross anywhere a query may reach (their shared range plus the margin).
 * - A polynomial liquor without a stated `validity.massFraction` is taken as 0–0.99, and every
 *   result carries a "custom-validity-unstated" warning.
 */
import { EngineInputError } from '../errors.js';
import { addWarning, type Citation, type EngineWarning, type WarningSink } from '../types.js';
import {
  IF97,
  if97CitationFor,
  liquidViscosity,
  saturatedLiquidAtTemperature,
  saturationPressure,
  saturationTemperature,
} from '../steam/if97.js';
import { fitLine, interpolateLinear, interpolateSlope, lerp, segmentIndex } from '../numeric/interpolate.js';
import { polyMinimum, polyval } from '../numeric/polynomial.js';
import { defineLiquorModel, type Interval, type LiquorModel, type ValidityBox } from './model.js';
import { checkAgainst } from './validity.js';

// ---------------------------------------------------------------------------------------------
// Definition types (SI)
// ---------------------------------------------------------------------------------------------

/** One reading of a Dühring line: both boiling points at the same pressure, K. */
export interface DuhringPoint {
  /** Boiling point of pure water at the pressure of the reading, K. */
  waterBoilingPoint: number;
  /** Boiling point of the solution at the same pressure, K. */
  solutionBoilingPoint: number;
}

export interface DuhringLine {
  /** Mass fraction of solute, 0 ≤ x < 1. */
  massFraction: number;
  /** At least 2, at most 50 readings, water boiling points strictly increasing. */
  points: DuhringPoint[];
}

export interface EnthalpyPoint {
  /** K */
  temperature: number;
  /** J/kg, steam-table datum (liquid water at the triple point = 0). */
  enthalpy: number;
}

export interface EnthalpyRow {
  /** Mass fraction of solute, 0 ≤ x < 1. */
  massFraction: number;
  /** At least 2, at most 50 points, temperatures strictly increasing. */
  points: EnthalpyPoint[];
}

/** Coefficients in ascending powers of x: Σ c_i·x^i (1 to 9 coefficients, degree ≤ 8). */
export interface PolynomialData {
  polynomial: number[];
}

export interface EnthalpyTableData {
  table: EnthalpyRow[];
}

interface CustomLiquorCommon {
  /** Display name (1–100 characters); the default id is "custom:" + its slug. */
  name: string;
  /** Optional id; must start with "custom:" so that it can never shadow a built-in model. */
  id?: string;
  /** What x means, e.g. "dry-solids mass fraction". Default "mass fraction of solute". */
  compositionVariable?: string;
  /** c_p(x) = Σ d_i·x^i, J/(kg·K). */
  heatCapacity?: PolynomialData;
  /** User-given enthalpies; replace the c_p-based enthalpy. */
  enthalpy?: EnthalpyTableData;
  /** ρ(x) = Σ c_i·x^i, kg/m³. */
  density?: PolynomialData;
  /** μ(x, T)/μ_water(T) = Σ c_i·x^i (dimensionless; μ_water from IAPWS R12-08). */
  viscosity?: PolynomialData;
  /** k(x) = Σ c_i·x^i, W/(m·K). */
  thermalConductivity?: PolynomialData;
  /** σ(x) = Σ c_i·x^i, N/m. */
  surfaceTension?: PolynomialData;
}

/** (a) Dühring table, optionally with c_p polynomial and/or enthalpy table. */
export interface DuhringLiquorDefinition extends CustomLiquorCommon {
  boilingPoint: { duhring: DuhringLine[] };
  boilingPointRise?: never;
  validity?: never;
}

/** (b) BPR polynomial (pressure-independent), with a c_p polynomial and/or an enthalpy table. */
export interface PolynomialLiquorDefinition extends CustomLiquorCommon {
  /** BPR(x) = Σ c_i·x^i, K. */
  boilingPointRise: PolynomialData;
  boilingPoint?: never;
  /** Range of the data behind the polynomials. massFraction within [0, 1); temperature in K. */
  validity?: { massFraction: Interval; temperature?: Interval };
}

export type CustomLiquorDefinition = DuhringLiquorDefinition | PolynomialLiquorDefinition;

/** A custom liquor model: a LiquorModel plus what was noticed while building it. */
export interface CustomLiquorModel extends LiquorModel {
  kind: 'custom';
  /** Warnings about the data themselves (e.g. a Dühring line fitting its points poorly). */
  definitionWarnings: EngineWarning[];
}

// ---------------------------------------------------------------------------------------------
// Limits and decisions
// ---------------------------------------------------------------------------------------------

/** Beyond the data in x, extrapolation with a warning up to this absolute margin. */
export const MASS_FRACTION_MARGIN = 0.02;
/** Beyond the data in temperature, extrapolation with a warning up to this margin, K. */
export const TEMPERATURE_MARGIN = 10;
/** A tabulated or fitted BPR may be this much below zero (chart-reading noise), K. */
export const BPR_TOLERANCE = 0.05;
/** A Dühring point farther than this from its least-squares line gives a warning, K. */
export const DUHRING_FIT_WARNING = 0.5;
/** Highest mass fraction any custom liquor may reach. */
export const MAX_MASS_FRACTION = 0.999;
export const MAX_LINES = 50;
export const MAX_POINTS = 50;
export const MAX_POLYNOMIAL_DEGREE = 8;
/** Mass-fraction range assumed for a polynomial liquor that states none. */
export const DEFAULT_POLYNOMIAL_MASS_FRACTION: Interval = { min: 0, max: 0.99 };
/** Temperature range of liquid water in IF97 region 1 (273.15 K to 623.15 K). */
const LIQUID_TEMPERATURE: Interval = { min: IF97.minTemperature, max: IF97.region13Temperature };
/** Range of water boiling points: the IF97 saturation line (273.15 K to 647.096 K). */
const SATURATION_TEMPERATURE: Interval = { min: IF97.minTemperature, max: IF97.criticalTemperature };
/** Steam-table enthalpy datum: liquid water at the triple point. */
const DATUM_TEMPERATURE = IF97.tripleTemperature;

const MF = 'kg/kg';

const USER_DATA: Citation = { key: 'user-data', reference: 'Data supplied by the user' };
const DUHRING: Citation = {
  key: 'duhring-1878',
  reference:
    'U. Dühring, "Neue Grundgesetze zur rationellen Physik und Chemie", Leipzig, 1878 (Dühring\'s rule)',
};
const IF97_CITATION: Citation = if97CitationFor('boiling point of water');

// ---------------------------------------------------------------------------------------------
// Validation
// ---------------------------------------------------------------------------------------------

/** An invalid custom-liquor definition; `field` is the path into the definition. */
export class CustomLiquorDefinitionError extends EngineInputError {
  constructor(
    field: string,
    message: string,
    /** The offending value, when there is a single one. */
    readonly value?: unknown,
    /** The range the value should lie in, when there is one. */
    readonly validRange?: { min: number; max: number; unit: string },
  ) {
    super(field, `${field}: ${message}`);
  }
}

function fail(
  field: string,
  message: string,
  value?: unknown,
  range?: { min: number; max: number; unit: string },
): never {
  throw new CustomLiquorDefinitionError(field, message, value, range);
}

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

function finiteNumber(v: unknown, field: string, unit: string): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    fail(field, `must be a finite number in ${unit}, got ${String(v)}`, v);
  }
  return v;
}

function numberIn(v: unknown, field: string, range: Interval, unit: string, upperOpen = false): number {
  const n = finiteNumber(v, field, unit);
  if (n < range.min || (upperOpen ? n >= range.max : n > range.max)) {
    const upper = upperOpen ? `below ${range.max}` : `at most ${range.max}`;
    fail(field, `${n} ${unit} is outside the valid range: at least ${range.min} and ${upper} ${unit}`, n, {
      ...range,
      unit,
    });
  }
  return n;
}

function arrayOf(v: unknown, field: string, min: number, max: number, what: string): unknown[] {
  if (!Array.isArray(v)) fail(field, `must be a list of ${what}`);
  if (v.length < min || v.length > max) {
    fail(field, `must hold ${min} to ${max} ${what}, got ${v.length}`, v.length, { min, max, unit: 'items' });
  }
  return v;
}

function interval(v: unknown, field: string, bounds: Interval, unit: string, upperOpen = false): Interval {
  if (!isRecord(v)) fail(field, 'must be an object { min, max }');
  const min = numberIn(v.min, `${field}.min`, bounds, unit, upperOpen);
  const max = numberIn(v.max, `${field}.max`, bounds, unit, upperOpen);
  if (!(max > min)) fail(`${field}.max`, `must exceed ${field}.min (${min} ${unit}), got ${max}`, max);
  return { min, max };
}

function polynomial(v: unknown, field: string): number[] {
  if (!isRecord(v)) fail(field, 'must be an object { polynomial: [c0, c1, …] }');
  const list = arrayOf(v.polynomial, `${field}.polynomial`, 1, MAX_POLYNOMIAL_DEGREE + 1, 'coefficients');
  return list.map((c, i) => finiteNumber(c, `${field}.polynomial[${i}]`, 'the coefficient unit'));
}

/** One compiled Dühring line. Water's own line (x = 0, a = 0, b = 1) has an unbounded range. */
interface CompiledLine {
  x: number;
  a: number;
  b: number;
  /** Water boiling point range of the data, K. */
  twMin: number;
  twMax: number;
  /** Index in the user's table, or -1 for the implicit pure-water line. */
  index: number;
  fitWarning?: EngineWarning;
}

/** A pair of adjacent lines (or rows) with the range their data share, in the checked unit. */
interface PairRange {
  validity: Interval;
  limits: Interval;
}

interface CompiledRow {
  x: number;
  ts: number[];
  hs: number[];
  index: number;
}

interface Compiled {
  id: string;
  name: string;
  compositionVariable: string;
  lines?: CompiledLine[];
  linePairs?: PairRange[];
  bpr?: number[];
  cp?: number[];
  /** Optional property polynomials in x (SI; viscosity relative to water). */
  properties: Partial<Record<CustomProperty, number[]>>;
  rows?: CompiledRow[];
  rowPairs?: PairRange[];
  /** Mass fraction range of the boiling-point data and its hard limits. */
  xValidity: Interval;
  xLimits: Interval;
  /** Temperature range of the c_p polynomial (or the stated validity) and its limits, K. */
  tValidity: Interval;
  tLimits: Interval;
  /** Mass fraction range of the enthalpy table and its limits. */
  hxValidity?: Interval;
  hxLimits?: Interval;
  validityStated: boolean;
  definitionWarnings: EngineWarning[];
  box: ValidityBox;
  limitsBox: ValidityBox;
}

/** The optional property polynomials, with what each must stay above and its SI unit. */
const CUSTOM_PROPERTIES = {
  density: { what: 'density', unit: 'kg/m³' },
  viscosity: { what: 'relative viscosity μ/μ_water', unit: '1' },
  thermalConductivity: { what: 'thermal conductivity', unit: 'W/(m·K)' },
  surfaceTension: { what: 'surface tension', unit: 'N/m' },
} as const;
type CustomProperty = keyof typeof CUSTOM_PROPERTIES;

/** Lowercase ASCII slug: "Black liquor (mill 2)" → "black-liquor-mill-2". */
export function slugify(name: string): string {
  return name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80);
}

function widen(range: Interval, margin: number, bounds: Interval): Interval {
  return { min: Math.max(bounds.min, range.min - margin), max: Math.min(bounds.max, range.max + margin) };
}

function compileDuhring(
  v: unknown,
  warnings: EngineWarning[],
): { lines: CompiledLine[]; pairs: PairRange[] } {
  const field = 'boilingPoint.duhring';
  if (!isRecord(v)) fail('boilingPoint', 'must be an object { duhring: [...] }');
  const table = arrayOf(v.duhring, field, 1, MAX_LINES, 'concentrations');
  const lines: CompiledLine[] = [];
  table.forEach((entry, i) => {
    const f = `${field}[${i}]`;
    if (!isRecord(entry)) fail(f, 'must be an object { massFraction, points }');
    const x = numberIn(entry.massFraction, `${f}.massFraction`, { min: 0, max: 1 }, MF, true);
    const prev = lines[lines.length - 1];
    if (prev && !(x > prev.x)) {
      fail(`${f}.massFraction`, `concentrations must be strictly increasing: ${x} follows ${prev.x}`, x);
    }
    const pts = arrayOf(entry.points, `${f}.points`, 2, MAX_POINTS, 'points');
    const tws: number[] = [];
    const tss: number[] = [];
    pts.forEach((p, j) => {
      const pf = `${f}.points[${j}]`;
      if (!isRecord(p)) fail(pf, 'must be an object { waterBoilingPoint, solutionBoilingPoint }');
      const tw = numberIn(p.waterBoilingPoint, `${pf}.waterBoilingPoint`, SATURATION_TEMPERATURE, 'K');
      const last = tws[tws.length - 1];
      if (last !== undefined && !(tw > last)) {
        fail(
          `${pf}.waterBoilingPoint`,
          `water boiling points must be strictly increasing: ${tw} K follows ${last} K`,
          tw,
        );
      }
      const ts = finiteNumber(p.solutionBoilingPoint, `${pf}.solutionBoilingPoint`, 'K');
      if (ts < tw - BPR_TOLERANCE) {
        fail(
          `${pf}.solutionBoilingPoint`,
          `${ts} K is below the boiling point of water at the same pressure (${tw} K); a solution boils at or above it (tolerance ${BPR_TOLERANCE} K)`,
          ts,
          { min: tw - BPR_TOLERANCE, max: Infinity, unit: 'K' },
        );
      }
      if (x === 0 && Math.abs(ts - tw) > BPR_TOLERANCE) {
        fail(
          `${pf}.solutionBoilingPoint`,
          `at x = 0 the liquor is water and must boil at ${tw} K, got ${ts} K`,
          ts,
        );
      }
      tws.push(tw);
      tss.push(ts);
    });
    const fit = fitLine(tws, tss);
    if (!(fit.slope > 0)) {
      fail(`${f}.points`, `the Dühring line has slope ${fit.slope}; it must be positive`, fit.slope, {
        min: 0,
        max: Infinity,
        unit: 'K/K',
      });
    }
    const line: CompiledLine = {
      x,
      a: fit.intercept,
      b: fit.slope,
      twMin: tws[0] as number,
      twMax: tws[tws.length - 1] as number,
      index: i,
    };
    if (fit.maxDeviation > DUHRING_FIT_WARNING) {
      line.fitWarning = {
        code: 'duhring-fit-deviation',
        field: f,
        message: `The points at x = ${x} lie up to ${fit.maxDeviation.toFixed(2)} K from their Dühring line (least-squares); boiling points near this concentration are uncertain by that much`,
      };
      warnings.push(line.fitWarning);
    }
    lines.push(line);
  });
  const first = lines[0] as CompiledLine;
  if (first.x > 0) {
    lines.unshift({ x: 0, a: 0, b: 1, twMin: -Infinity, twMax: Infinity, index: -1 });
  }
  if (lines.length < 2) fail(field, 'needs at least one concentration above 0');

  const pairs: PairRange[] = [];
  for (let i = 0; i + 1 < lines.length; i++) {
    const lo = lines[i] as CompiledLine;
    const hi = lines[i + 1] as CompiledLine;
    const shared = { min: Math.max(lo.twMin, hi.twMin), max: Math.min(lo.twMax, hi.twMax) };
    const f = `${field}[${hi.index}]`;
    if (!(shared.max > shared.min)) {
      fail(
        `${f}.points`,
        `the water boiling points at x = ${hi.x} (${hi.twMin} to ${hi.twMax} K) share no range with those at x = ${lo.x} (${lo.twMin} to ${lo.twMax} K); interpolating between them would rest on no data`,
      );
    }
    const reach = widen(shared, TEMPERATURE_MARGIN, SATURATION_TEMPERATURE);
    for (const tw of [reach.min, reach.max]) {
      const gap = hi.a - lo.a + (hi.b - lo.b) * tw;
      if (lo.index === -1) {
        if (gap < -BPR_TOLERANCE) {
          fail(
            `${f}.points`,
            `the Dühring line at x = ${hi.x} gives a boiling point ${(-gap).toFixed(3)} K below water's at a water boiling point of ${tw.toFixed(2)} K (within the data range plus the ${TEMPERATURE_MARGIN} K margin, ${reach.min.toFixed(2)} to ${reach.max.toFixed(2)} K)`,
          );
        }
      } else if (!(gap > 0)) {
        fail(
          `${f}.points`,
          `the Dühring lines at x = ${lo.x} and x = ${hi.x} cross: at a water boiling point of ${tw.toFixed(2)} K the richer liquor would not boil higher (range checked: ${reach.min.toFixed(2)} to ${reach.max.toFixed(2)} K, the shared data plus ${TEMPERATURE_MARGIN} K)`,
        );
      }
    }
    pairs.push({
      validity: { min: saturationPressure(shared.min), max: saturationPressure(shared.max) },
      limits: { min: saturationPressure(reach.min), max: saturationPressure(reach.max) },
    });
  }
  return { lines, pairs };
}

function compileEnthalpyTable(v: unknown): {
  rows: CompiledRow[];
  pairs: PairRange[];
  xmax: number;
  t: Interval;
} {
  const field = 'enthalpy.table';
  if (!isRecord(v)) fail('enthalpy', 'must be an object { table: [...] }');
  const table = arrayOf(v.table, field, 1, MAX_LINES, 'concentrations');
  const rows: CompiledRow[] = [];
  table.forEach((entry, i) => {
    const f = `${field}[${i}]`;
    if (!isRecord(entry)) fail(f, 'must be an object { massFraction, points }');
    const x = numberIn(entry.massFraction, `${f}.massFraction`, { min: 0, max: 1 }, MF, true);
    const prev = rows[rows.length - 1];
    if (prev && !(x > prev.x)) {
      fail(`${f}.massFraction`, `concentrations must be strictly increasing: ${x} follows ${prev.x}`, x);
    }
    const pts = arrayOf(entry.points, `${f}.points`, 2, MAX_POINTS, 'points');
    const ts: number[] = [];
    const hs: number[] = [];
    pts.forEach((p, j) => {
      const pf = `${f}.points[${j}]`;
      if (!isRecord(p)) fail(pf, 'must be an object { temperature, enthalpy }');
      const t = numberIn(p.temperature, `${pf}.temperature`, LIQUID_TEMPERATURE, 'K');
      const h = finiteNumber(p.enthalpy, `${pf}.enthalpy`, 'J/kg');
      const lastT = ts[ts.length - 1];
      const lastH = hs[hs.length - 1];
      if (lastT !== undefined && !(t > lastT)) {
        fail(`${pf}.temperature`, `temperatures must be strictly increasing: ${t} K follows ${lastT} K`, t);
      }
      if (lastH !== undefined && !(h > lastH)) {
        fail(
          `${pf}.enthalpy`,
          `enthalpy must increase with temperature (positive heat capacity): ${h} J/kg at ${t} K follows ${lastH} J/kg`,
          h,
        );
      }
      ts.push(t);
      hs.push(h);
    });
    rows.push({ x, ts, hs, index: i });
  });
  const xmax = (rows[rows.length - 1] as CompiledRow).x;
  const t = {
    min: Math.min(...rows.map((r) => r.ts[0] as number)),
    max: Math.max(...rows.map((r) => r.ts[r.ts.length - 1] as number)),
  };
  if ((rows[0] as CompiledRow).x > 0) {
    // Pure water below the lowest row: saturated liquid from IF97 (range of IF97 region 1).
    rows.unshift({ x: 0, ts: [], hs: [], index: -1 });
  }
  const pairs: PairRange[] = [];
  for (let i = 0; i + 1 < rows.length; i++) {
    const lo = rows[i] as CompiledRow;
    const hi = rows[i + 1] as CompiledRow;
    const range = (r: CompiledRow): Interval =>
      r.index === -1 ? LIQUID_TEMPERATURE : { min: r.ts[0] as number, max: r.ts[r.ts.length - 1] as number };
    const a = range(lo);
    const b = range(hi);
    const shared = { min: Math.max(a.min, b.min), max: Math.min(a.max, b.max) };
    if (!(shared.max > shared.min)) {
      fail(
        `${field}[${hi.index}].points`,
        `the temperatures at x = ${hi.x} (${b.min} to ${b.max} K) share no range with those at x = ${lo.x} (${a.min} to ${a.max} K)`,
      );
    }
    pairs.push({ validity: shared, limits: widen(shared, TEMPERATURE_MARGIN, LIQUID_TEMPERATURE) });
  }
  return { rows, pairs, xmax, t };
}

function checkPolynomialOver(
  coefficients: number[],
  field: string,
  range: Interval,
  floor: number,
  what: string,
  unit: string,
): void {
  const min = polyMinimum(coefficients, range.min, range.max);
  if (!Number.isFinite(min.value) || !(min.value > floor || (floor < 0 && min.value >= floor))) {
    fail(
      field,
      `${what} = ${min.value} ${unit} at x = ${min.x}; it must be ${floor < 0 ? `at least ${floor}` : 'positive'} over the mass-fraction range ${range.min} to ${range.max} (the stated validity plus the ${MASS_FRACTION_MARGIN} margin)`,
      min.value,
      { min: floor, max: Infinity, unit },
    );
  }
}

function compile(def: unknown): Compiled {
  if (!isRecord(def)) fail('definition', 'must be an object');
  if (typeof def.name !== 'string' || def.name.trim().length === 0 || def.name.length > 100) {
    fail('name', 'must be a non-empty string of at most 100 characters', def.name);
  }
  const name = def.name.trim();
  let id: string;
  if (def.id === undefined) {
    const slug = slugify(name);
    if (slug.length === 0)
      fail('name', 'must contain at least one letter or digit to derive an id from', name);
    id = `custom:${slug}`;
  } else {
    if (typeof def.id !== 'string' || !/^custom:[a-z0-9][a-z0-9._-]{0,79}$/.test(def.id)) {
      fail('id', 'must be "custom:" followed by 1–80 lowercase letters, digits, ".", "_" or "-"', def.id);
    }
    id = def.id;
  }
  let compositionVariable = 'mass fraction of solute';
  if (def.compositionVariable !== undefined) {
    if (typeof def.compositionVariable !== 'string' || def.compositionVariable.length > 100) {
      fail('compositionVariable', 'must be a string of at most 100 characters', def.compositionVariable);
    }
    compositionVariable = def.compositionVariable;
  }

  const hasDuhring = def.boilingPoint !== undefined;
  const hasPolynomial = def.boilingPointRise !== undefined;
  if (hasDuhring === hasPolynomial) {
    fail(
      hasDuhring ? 'boilingPointRise' : 'boilingPoint',
      'give exactly one of boilingPoint.duhring (a Dühring table) or boilingPointRise.polynomial',
    );
  }
  const definitionWarnings: EngineWarning[] = [];
  const out: Partial<Compiled> = {
    id,
    name,
    compositionVariable,
    definitionWarnings,
    validityStated: true,
    properties: {},
  };

  let xValidity: Interval;
  let tValidity: Interval = LIQUID_TEMPERATURE;
  let tLimits: Interval = LIQUID_TEMPERATURE;
  const notes: string[] = [];
  let pressureBox: { validity: Interval; limits: Interval } | undefined;

  if (hasDuhring) {
    if (def.validity !== undefined) {
      fail('validity', 'a Dühring liquor takes its validity from its table; remove validity');
    }
    const { lines, pairs } = compileDuhring(def.boilingPoint, definitionWarnings);
    out.lines = lines;
    out.linePairs = pairs;
    xValidity = { min: 0, max: (lines[lines.length - 1] as CompiledLine).x };
    const real = lines.filter((l) => l.index >= 0);
    const twMin = Math.min(...real.map((l) => l.twMin));
    const twMax = Math.max(...real.map((l) => l.twMax));
    pressureBox = {
      validity: { min: saturationPressure(twMin), max: saturationPressure(twMax) },
      limits: {
        min: Math.min(...pairs.map((p) => p.limits.min)),
        max: Math.max(...pairs.map((p) => p.limits.max)),
      },
    };
    notes.push(
      `Dühring table: ${real.length} concentration(s); the pressure range checked at a given x is that shared by the two lines around it (water boiling points ${twMin.toFixed(2)} to ${twMax.toFixed(2)} K overall), with a ${TEMPERATURE_MARGIN} K margin of extrapolation`,
    );
  } else {
    out.bpr = polynomial(def.boilingPointRise, 'boilingPointRise');
    if (def.validity === undefined) {
      xValidity = DEFAULT_POLYNOMIAL_MASS_FRACTION;
      out.validityStated = false;
      notes.push('No validity range was stated; x is limited to 0–0.99 and results carry a warning');
    } else {
      if (!isRecord(def.validity)) fail('validity', 'must be an object { massFraction, temperature? }');
      xValidity = interval(def.validity.massFraction, 'validity.massFraction', { min: 0, max: 1 }, MF, true);
      if (def.validity.temperature !== undefined) {
        tValidity = interval(def.validity.temperature, 'validity.temperature', LIQUID_TEMPERATURE, 'K');
        tLimits = widen(tValidity, TEMPERATURE_MARGIN, LIQUID_TEMPERATURE);
      }
    }
    if (def.heatCapacity === undefined && def.enthalpy === undefined) {
      fail('heatCapacity', 'a polynomial liquor needs heatCapacity.polynomial or an enthalpy table');
    }
  }
  const xLimits =
    out.validityStated === false
      ? xValidity
      : widen(xValidity, MASS_FRACTION_MARGIN, { min: 0, max: Math.max(MAX_MASS_FRACTION, xValidity.max) });
  if (out.bpr) {
    checkPolynomialOver(out.bpr, 'boilingPointRise.polynomial', xLimits, -BPR_TOLERANCE, 'BPR', 'K');
  }
  if (def.heatCapacity !== undefined) {
    out.cp = polynomial(def.heatCapacity, 'heatCapacity');
    checkPolynomialOver(out.cp, 'heatCapacity.polynomial', xLimits, 0, 'c_p', 'J/(kg·K)');
  }
  for (const [key, spec] of Object.entries(CUSTOM_PROPERTIES) as [
    CustomProperty,
    (typeof CUSTOM_PROPERTIES)[CustomProperty],
  ][]) {
    if (def[key] === undefined) continue;
    const coefficients = polynomial(def[key], key);
    checkPolynomialOver(coefficients, `${key}.polynomial`, xLimits, 0, spec.what, spec.unit);
    (out.properties as Partial<Record<CustomProperty, number[]>>)[key] = coefficients;
  }
  let enthalpyT: Interval | undefined;
  if (def.enthalpy !== undefined) {
    const { rows, pairs, xmax, t } = compileEnthalpyTable(def.enthalpy);
    out.rows = rows;
    out.rowPairs = pairs;
    out.hxValidity = { min: 0, max: xmax };
    out.hxLimits = widen(out.hxValidity, MASS_FRACTION_MARGIN, {
      min: 0,
      max: Math.max(MAX_MASS_FRACTION, xmax),
    });
    enthalpyT = t;
    notes.push(
      `Enthalpy table: ${rows.filter((r) => r.index >= 0).length} concentration(s) up to x = ${xmax}, ${t.min} to ${t.max} K; the temperature range checked at a given x is that shared by the two rows around it, with a ${TEMPERATURE_MARGIN} K margin`,
    );
  }
  if (!out.cp && !out.rows)
    notes.push('No heat capacity or enthalpy data: enthalpy and heat capacity are unavailable');

  const temperatureValidity = enthalpyT ?? tValidity;
  const temperatureLimits = enthalpyT ? widen(enthalpyT, TEMPERATURE_MARGIN, LIQUID_TEMPERATURE) : tLimits;
  const box: ValidityBox = { massFraction: xValidity, temperature: temperatureValidity, notes };
  const limitsBox: ValidityBox = { massFraction: xLimits, temperature: temperatureLimits };
  if (pressureBox) {
    box.pressure = pressureBox.validity;
    limitsBox.pressure = pressureBox.limits;
  }
  return {
    ...(out as Compiled),
    xValidity,
    xLimits,
    tValidity,
    tLimits,
    box,
    limitsBox,
  };
}

/**
 * Checks a custom-liquor definition and throws a {@link CustomLiquorDefinitionError} (an
 * EngineInputError) whose `field` is the path of the first problem, e.g.
 * "boilingPoint.duhring[2].points[1].solutionBoilingPoint". Returns normally when it is valid.
 */
export function validateCustomLiquorDefinition(def: unknown): asserts def is CustomLiquorDefinition {
  compile(def);
}

// ---------------------------------------------------------------------------------------------
// The model
// ---------------------------------------------------------------------------------------------

/**
 * Builds a liquor model from user data (see the module comment for the three kinds of
 * definition and the extrapolation rules). Throws {@link CustomLiquorDefinitionError} for an
 * invalid definition. The definition is copied: later changes to it do not affect the model.
 *
 * @param definition all values in SI (K, J/kg, J/(kg·K), mass fraction 0–1)
 */
export function createCustomLiquor(definition: CustomLiquorDefinition): CustomLiquorModel {
  const c = compile(structuredClone(definition));
  const { id } = c;
  const isDuhring = c.lines !== undefined;
  const lineXs = c.lines?.map((l) => l.x) ?? [];
  const rowXs = c.rows?.map((r) => r.x) ?? [];
  const sources: Citation[] = isDuhring ? [USER_DATA, DUHRING, IF97_CITATION] : [USER_DATA, IF97_CITATION];

  const unstated = (w: WarningSink): void => {
    if (!c.validityStated) {
      addWarning(w, {
        code: 'custom-validity-unstated',
        field: 'massFraction',
        message: `The custom liquor "${c.name}" states no validity range; its polynomials are applied for 0 ≤ x ≤ 0.99 without a check against data`,
      });
    }
  };

  const boilingPoint = (x: number, p: number, w?: WarningSink): number => {
    checkAgainst(id, 'massFraction', x, MF, c.xValidity, c.xLimits, w);
    unstated(w);
    const tw = saturationTemperature(p);
    if (c.lines && c.linePairs) {
      const i = segmentIndex(lineXs, x);
      const lo = c.lines[i] as CompiledLine;
      const hi = c.lines[i + 1] as CompiledLine;
      const pair = c.linePairs[i] as PairRange;
      checkAgainst(id, 'pressure', p, 'Pa', pair.validity, pair.limits, w);
      if (lo.fitWarning && x < hi.x) addWarning(w, lo.fitWarning);
      if (hi.fitWarning && x > lo.x) addWarning(w, hi.fitWarning);
      const a = lerp(lo.x, lo.a, hi.x, hi.a, x);
      const b = lerp(lo.x, lo.b, hi.x, hi.b, x);
      return a + b * tw;
    }
    const bpr = polyval(c.bpr as number[], x);
    const t = tw + bpr;
    checkAgainst(id, 'boilingPoint', t, 'K', c.tValidity, c.tLimits, w);
    return t;
  };

  const noThermal = (): never => {
    throw new EngineInputError(
      'enthalpy',
      `The custom liquor "${c.name}" has no heat-capacity polynomial or enthalpy table, so its enthalpy is unknown; add one to its definition`,
    );
  };

  /** Enthalpy (J/kg) and slope ∂h/∂T (J/(kg·K)) of the table at (x, T). */
  const fromTable = (x: number, t: number, w: WarningSink): { h: number; cp: number } => {
    const rows = c.rows as CompiledRow[];
    const pairs = c.rowPairs as PairRange[];
    checkAgainst(id, 'massFraction', x, MF, c.hxValidity as Interval, c.hxLimits as Interval, w);
    const i = segmentIndex(rowXs, x);
    const lo = rows[i] as CompiledRow;
    const hi = rows[i + 1] as CompiledRow;
    const pair = pairs[i] as PairRange;
    checkAgainst(id, 'temperature', t, 'K', pair.validity, pair.limits, w);
    const at = (r: CompiledRow): { h: number; cp: number } => {
      if (r.index === -1) {
        const liquid = saturatedLiquidAtTemperature(t);
        return { h: liquid.enthalpy, cp: liquid.heatCapacity as number };
      }
      return { h: interpolateLinear(r.ts, r.hs, t), cp: interpolateSlope(r.ts, r.hs, t) };
    };
    const a = at(lo);
    const b = at(hi);
    return { h: lerp(lo.x, a.h, hi.x, b.h, x), cp: lerp(lo.x, a.cp, hi.x, b.cp, x) };
  };

  const enthalpy = (x: number, t: number, w?: WarningSink): number => {
    if (c.rows) return fromTable(x, t, w).h;
    if (!c.cp) return noThermal();
    checkAgainst(id, 'massFraction', x, MF, c.xValidity, c.xLimits, w);
    checkAgainst(id, 'temperature', t, 'K', c.tValidity, c.tLimits, w);
    unstated(w);
    return polyval(c.cp, x) * (t - DATUM_TEMPERATURE);
  };

  const heatCapacity = (x: number, t: number, w?: WarningSink): number => {
    if (c.cp) {
      checkAgainst(id, 'massFraction', x, MF, c.xValidity, c.xLimits, w);
      checkAgainst(id, 'temperature', t, 'K', c.tValidity, c.tLimits, w);
      unstated(w);
      return polyval(c.cp, x);
    }
    if (c.rows) return fromTable(x, t, w).cp;
    return noThermal();
  };

  const model = defineLiquorModel<CustomLiquorModel>({
    id,
    name: c.name,
    kind: 'custom',
    compositionVariable: c.compositionVariable,
    validity: c.box,
    limits: c.limitsBox,
    sources,
    cautions: [],
    definitionWarnings: c.definitionWarnings,
    boilingPoint,
    enthalpy,
  });
  if (c.cp || c.rows) model.heatCapacity = heatCapacity;

  /** The x and T checks of the polynomials, and the property's value at x. */
  const property = (key: CustomProperty, x: number, t: number, w?: WarningSink): number => {
    checkAgainst(id, 'massFraction', x, MF, c.xValidity, c.xLimits, w);
    checkAgainst(id, 'temperature', t, 'K', c.tValidity, c.tLimits, w);
    unstated(w);
    return polyval(c.properties[key] as number[], x);
  };
  if (c.properties.density) model.density = (x, t, w) => property('density', x, t, w);
  if (c.properties.viscosity) {
    model.viscosity = (x, t, w) => property('viscosity', x, t, w) * liquidViscosity(t);
  }
  if (c.properties.thermalConductivity) {
    model.thermalConductivity = (x, t, w) => property('thermalConductivity', x, t, w);
  }
  if (c.properties.surfaceTension) model.surfaceTension = (x, t, w) => property('surfaceTension', x, t, w);
  return model;
}
