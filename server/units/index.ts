/**
 * Units at the API boundary. The API layer calls {@link parseQuantity} on every dimensional input
 * (a bare number in Ebullio's default unit, or a string such as "1.4 bar", "38 degC", "4.5 t/h",
 * "2 barg", "65 %", "60 Bx") and hands the engine plain SI numbers; {@link formatOutput} turns SI
 * results into Ebullio's default output units. The engine never parses units.
 *
 * Conversions come from the js-quantities package (1.8.0): each accepted spelling maps, through a
 * small alias table, to a js-quantities unit, and the affine map value → SI (factor and offset) is
 * taken from js-quantities once, when this module loads. Ebullio's own additions on top:
 * - Compound units ("W/m2-K", "BTU/(h ft2 F)", "kg/min") by the one grammar of grammar.ts,
 *   normalised to an expression js-quantities reads.
 * - Gauge pressures (barg, kPag, psig) add the atmosphere, vacuum readings (inHg vac, mmHg vac)
 *   are taken from it: the request's `atmosphericPressure`, else 101.325 kPa (one standard
 *   atmosphere) — the common-practice reading when the local barometric pressure is not given.
 *   A bare "inHg" is refused as ambiguous.
 * - Mass-fraction spellings (%, wt%, g/kg, ppm, Bx), which js-quantities treats as plain numbers.
 *   "Bx"/"°Bx" (degrees Brix) is taken as mass percent of dissolved solids, i.e. mass percent of
 *   sucrose for a pure sucrose solution (ICUMSA's definition of Brix as sucrose mass percent);
 *   for impure juices, Brix (a refractometric reading) only approximates the dry-solids percent.
 * - Exact factors where js-quantities rounds its definitions: it uses 6894.76 Pa for the psi,
 *   133.322368 Pa for the mmHg and 1055.056 J for the Btu. Ebullio uses the exact definitions
 *   (NIST Special Publication 811, 2008, Appendix B): 1 psi = 0.45359237 kg × 9.80665 m/s² /
 *   (0.0254 m)² = 6894.757293168… Pa; 1 mmHg = 13595.1 kg/m³ × 9.80665 m/s² × 1 mm =
 *   133.322387415 Pa; 1 Btu_IT = 1055.05585262 J.
 *
 * Temperatures: absolute temperatures (°C, K, °F) and temperature differences (K, Δ°C, Δ°F) are
 * distinct kinds, as in js-quantities ("tempC" vs "degC"): "10 °C" as a temperature is 283.15 K,
 * as a temperature difference it is 10 K.
 */
import { createRequire } from 'node:module';
import {
  defaultUnits as defaultUnitTable,
  quantityKinds,
  type QuantityKind,
} from '../../shared/quantities.js';
import { readCompound } from './grammar.js';

const require = createRequire(import.meta.url);

/** The part of js-quantities' API used here (the package ships no type declarations). */
interface Quantity {
  scalar: number;
  to(unit: string): Quantity;
  kind(): string;
}
type QtyFactory = (value: number, unit: string) => Quantity;
const Qty = require('js-quantities') as QtyFactory;

export { quantityKinds, type QuantityKind } from '../../shared/quantities.js';

/**
 * The unit families of this module. The API's quantity kinds (shared/quantities.ts) are its one
 * vocabulary; some kinds share a family and so its units, names and physical bounds: specific
 * heat capacity and specific entropy (kJ/(kg·K)), mass fraction and a plain fraction (kg/kg, %).
 */
type UnitFamily =
  | 'pressure'
  | 'temperature'
  | 'temperatureDifference'
  | 'massFlow'
  | 'specificEnthalpy'
  | 'heatCapacity'
  | 'heatTransferCoefficient'
  | 'area'
  | 'length'
  | 'power'
  | 'massFraction'
  | 'density'
  | 'specificEnergy'
  | 'velocity'
  | 'wettingRate'
  | 'foulingResistance'
  | 'thermalConductivity'
  | 'viscosity'
  | 'heatFlux';

const FAMILY: Readonly<Record<QuantityKind, UnitFamily>> = {
  pressure: 'pressure',
  temperature: 'temperature',
  temperatureDifference: 'temperatureDifference',
  massFlow: 'massFlow',
  specificEnthalpy: 'specificEnthalpy',
  specificHeatCapacity: 'heatCapacity',
  specificEntropy: 'heatCapacity',
  heatTransferCoefficient: 'heatTransferCoefficient',
  area: 'area',
  length: 'length',
  power: 'power',
  massFraction: 'massFraction',
  fraction: 'massFraction',
  density: 'density',
  specificEnergy: 'specificEnergy',
  velocity: 'velocity',
  wettingRate: 'wettingRate',
  foulingResistance: 'foulingResistance',
  thermalConductivity: 'thermalConductivity',
  viscosity: 'viscosity',
  heatFlux: 'heatFlux',
};

/** Ebullio's default unit of each kind (shared/quantities.ts): what a bare number means, and what results are given in. */
export const defaultUnits: Readonly<Record<QuantityKind, string>> = Object.fromEntries(
  quantityKinds.map((kind) => [kind, defaultUnitTable[kind].spelling]),
) as Record<QuantityKind, string>;

/** The SI unit the engine works in, per family. */
const SI_UNITS: Readonly<Record<UnitFamily, string>> = {
  pressure: 'Pa',
  temperature: 'K',
  temperatureDifference: 'K',
  massFlow: 'kg/s',
  specificEnthalpy: 'J/kg',
  heatCapacity: 'J/(kg·K)',
  heatTransferCoefficient: 'W/(m²·K)',
  area: 'm²',
  length: 'm',
  power: 'W',
  massFraction: 'kg/kg',
  density: 'kg/m³',
  specificEnergy: 'J/kg',
  velocity: 'm/s',
  wettingRate: 'kg/(m·s)',
  foulingResistance: 'm²·K/W',
  thermalConductivity: 'W/(m·K)',
  viscosity: 'Pa·s',
  heatFlux: 'W/m²',
};

/** The SI unit the engine works in, per kind. */
export const siUnits: Readonly<Record<QuantityKind, string>> = Object.fromEntries(
  quantityKinds.map((kind) => [kind, SI_UNITS[FAMILY[kind]]]),
) as Record<QuantityKind, string>;

/** js-quantities expression of each kind's SI unit. */
const QTY_SI: Record<UnitFamily, string | undefined> = {
  pressure: 'Pa',
  temperature: 'tempK',
  temperatureDifference: 'degK',
  massFlow: 'kg/s',
  specificEnthalpy: 'J/kg',
  heatCapacity: 'J/kg*degK',
  heatTransferCoefficient: 'W/m^2*degK',
  area: 'm^2',
  length: 'm',
  power: 'W',
  massFraction: undefined,
  density: 'kg/m^3',
  specificEnergy: 'J/kg',
  velocity: 'm/s',
  wettingRate: 'kg/m*s',
  foulingResistance: 'm^2*degK/W',
  thermalConductivity: 'W/m*degK',
  viscosity: 'Pa*s',
  heatFlux: 'W/m^2',
};

/** Exact values used instead of js-quantities' rounded ones (NIST SP 811 Appendix B). */
const PSI = (0.45359237 * 9.80665) / 0.0254 ** 2;
const MMHG = 13595.1 * 9.80665 * 1e-3;
const BTU = 1055.05585262;
const POUND = 0.45359237;
const FOOT = 0.3048;
const HOUR = 3600;
const RANKINE = 5 / 9;
const INHG = MMHG * 25.4;
/** The atmosphere gauge and vacuum readings refer to unless a request states its own. */
export const STANDARD_ATMOSPHERE = 101_325;

/**
 * One accepted unit: its canonical spelling (shown in messages and documentation), other
 * spellings, and either the js-quantities expression to convert with or an exact SI factor.
 */
interface UnitSpec {
  unit: string;
  aliases?: string[];
  /** js-quantities unit expression. */
  qty?: string;
  /** SI = value × factor + offset, when not taken from js-quantities. */
  factor?: number;
  /**
   * A gauge pressure (1: the atmosphere is added) or a vacuum below the atmosphere (-1: the value
   * is taken from it). The atmosphere is the request's `atmosphericPressure`, else 101.325 kPa.
   */
  gauge?: 1 | -1;
  /** A unit that measures only these liquors (°Bx: sucrose), refused for the others. */
  onlyFor?: { liquors: readonly string[]; what: string };
}

const UNIT_TABLE: Record<UnitFamily, UnitSpec[]> = {
  pressure: [
    { unit: 'Pa', qty: 'Pa' },
    { unit: 'kPa', aliases: ['kPa(a)', 'kPaa', 'kPa abs'], qty: 'kPa' },
    { unit: 'MPa', aliases: ['MPa(a)', 'MPaa'], qty: 'MPa' },
    { unit: 'bar', aliases: ['bar(a)', 'bara', 'bar abs'], qty: 'bar' },
    { unit: 'mbar', aliases: ['mbar(a)', 'mbara'], qty: 'mbar' },
    { unit: 'psi', aliases: ['psia', 'psi(a)'], factor: PSI },
    { unit: 'atm', qty: 'atm' },
    { unit: 'mmHg', aliases: ['mm Hg', 'torr', 'Torr', 'mmHg(a)', 'mmHga', 'mmHg abs'], factor: MMHG },
    { unit: 'inHg(a)', aliases: ['inHga', 'inHg abs', 'in Hg(a)', 'in Hg abs'], factor: INHG },
    { unit: 'barg', aliases: ['bar(g)', 'bar g'], qty: 'bar', gauge: 1 },
    { unit: 'mbarg', aliases: ['mbar(g)', 'mbar g'], qty: 'mbar', gauge: 1 },
    { unit: 'kPag', aliases: ['kPa(g)', 'kPa g'], qty: 'kPa', gauge: 1 },
    { unit: 'psig', aliases: ['psi(g)', 'psi g'], factor: PSI, gauge: 1 },
    // Vacuum gauges read down from the atmosphere (common practice in plants).
    { unit: 'inHg vac', aliases: ['inHg(v)', 'inHgv', 'inHg vacuum', 'in Hg vac'], factor: INHG, gauge: -1 },
    { unit: 'mmHg vac', aliases: ['mmHg(v)', 'mmHgv', 'mmHg vacuum', 'mm Hg vac'], factor: MMHG, gauge: -1 },
  ],
  temperature: [
    { unit: '°C', aliases: ['degC', 'C', 'ºC', '℃'], qty: 'tempC' },
    { unit: 'K', aliases: ['kelvin'], qty: 'tempK' },
    { unit: '°F', aliases: ['degF', 'F', 'ºF', '℉'], qty: 'tempF' },
  ],
  temperatureDifference: [
    { unit: 'K', aliases: ['kelvin'], qty: 'degK' },
    { unit: '°C', aliases: ['degC', 'C', 'ºC', 'Δ°C', 'ΔdegC', 'delta degC'], qty: 'degC' },
    { unit: '°F', aliases: ['degF', 'F', 'ºF', 'Δ°F', 'ΔdegF', 'delta degF'], qty: 'degF' },
  ],
  massFlow: [
    { unit: 'kg/s', qty: 'kg/s' },
    { unit: 'kg/h', aliases: ['kg/hr'], qty: 'kg/h' },
    { unit: 't/h', aliases: ['tonne/h', 't/hr', 'tph'], qty: 't/h' },
    { unit: 'lb/h', aliases: ['lb/hr', 'lbm/h', 'lbm/hr'], qty: 'lb/h' },
    { unit: 'lb/s', aliases: ['lbm/s'], qty: 'lb/s' },
  ],
  specificEnthalpy: [
    { unit: 'J/kg', qty: 'J/kg' },
    { unit: 'kJ/kg', qty: 'kJ/kg' },
    { unit: 'Btu/lb', aliases: ['BTU/lb', 'Btu/lbm', 'BTU/lbm'], factor: BTU / POUND },
  ],
  heatCapacity: [
    { unit: 'J/(kg·K)', aliases: ['J/kg/K', 'J/kgK', 'J/(kg*K)', 'J/kg·K'], qty: 'J/kg*degK' },
    { unit: 'kJ/(kg·K)', aliases: ['kJ/kg/K', 'kJ/kgK', 'kJ/(kg*K)', 'kJ/kg·K'], qty: 'kJ/kg*degK' },
    {
      unit: 'Btu/(lb·°F)',
      aliases: [
        'Btu/lb/°F',
        'Btu/lb°F',
        'Btu/(lb*°F)',
        'Btu/lb·°F',
        'Btu/(lb·degF)',
        'Btu/lb/degF',
        'BTU/lb/F',
      ],
      factor: BTU / POUND / RANKINE,
    },
  ],
  heatTransferCoefficient: [
    {
      unit: 'W/(m²·K)',
      aliases: ['W/m²K', 'W/m2K', 'W/(m2·K)', 'W/(m^2*K)', 'W/m^2/K', 'W/m2/K', 'W/m²/K', 'W/(m2 K)'],
      qty: 'W/m^2*degK',
    },
    {
      unit: 'kW/(m²·K)',
      aliases: ['kW/m²K', 'kW/m2K', 'kW/(m2·K)', 'kW/(m^2*K)', 'kW/m^2/K', 'kW/m2/K', 'kW/m²/K', 'kW/(m2 K)'],
      qty: 'kW/m^2*degK',
    },
    {
      unit: 'Btu/(h·ft²·°F)',
      aliases: [
        'Btu/h/ft²/°F',
        'Btu/(h*ft^2*°F)',
        'Btu/hft2F',
        'Btu/(hr·ft²·°F)',
        'Btu/h/ft2/F',
        'Btu/(h ft2 F)',
      ],
      factor: BTU / HOUR / FOOT ** 2 / RANKINE,
    },
  ],
  area: [
    { unit: 'm²', aliases: ['m2', 'm^2', 'sq m'], qty: 'm^2' },
    { unit: 'ft²', aliases: ['ft2', 'ft^2', 'sq ft', 'sqft'], qty: 'ft^2' },
  ],
  length: [
    { unit: 'm', qty: 'm' },
    { unit: 'mm', qty: 'mm' },
    { unit: 'ft', qty: 'ft' },
    { unit: 'in', aliases: ['inch'], qty: 'in' },
  ],
  power: [
    { unit: 'W', qty: 'W' },
    { unit: 'kW', qty: 'kW' },
    { unit: 'MW', qty: 'MW' },
    { unit: 'Btu/h', aliases: ['BTU/h', 'Btu/hr', 'BTU/hr'], factor: BTU / HOUR },
  ],
  massFraction: [
    { unit: 'kg/kg', aliases: ['fraction', 'mass fraction'], factor: 1 },
    {
      unit: '%',
      aliases: ['wt%', 'wt %', 'wt.%', 'wt. %', 'mass%', 'mass %', '% w/w', '%w/w'],
      factor: 0.01,
    },
    {
      unit: '°Bx',
      aliases: ['Bx', 'ºBx', 'brix', 'Brix', '°Brix'],
      factor: 0.01,
      onlyFor: { liquors: ['sucrose'], what: 'degrees Brix measure sucrose (sugar) solutions' },
    },
    // Salinity in parts per thousand is g/kg (common practice; not js-quantities' "ppt", 1e-12).
    { unit: 'g/kg', aliases: ['ppt', '‰'], factor: 1e-3 },
    { unit: 'ppm', aliases: ['ppmw', 'mg/kg'], factor: 1e-6 },
  ],
  density: [
    { unit: 'kg/m³', aliases: ['kg/m3', 'kg/m^3'], qty: 'kg/m^3' },
    { unit: 'g/cm³', aliases: ['g/cm3', 'g/cm^3', 'g/mL', 'g/ml'], qty: 'g/cm^3' },
    { unit: 'lb/ft³', aliases: ['lb/ft3', 'lb/ft^3'], factor: POUND / FOOT ** 3 },
  ],
  // 1 kWh = 3.6 MJ and 1 t = 1000 kg (exact).
  specificEnergy: [
    { unit: 'kWh/t', aliases: ['kWh/tonne', 'kW·h/t'], factor: 3600 },
    { unit: 'kWh/kg', factor: 3.6e6 },
    { unit: 'MJ/t', aliases: ['MJ/tonne'], factor: 1000 },
  ],
  velocity: [
    { unit: 'm/s', qty: 'm/s' },
    { unit: 'ft/s', aliases: ['fps'], qty: 'ft/s' },
  ],
  wettingRate: [
    { unit: 'kg/(m·s)', aliases: ['kg/(m*s)', 'kg/m/s', 'kg/m·s', 'kg/(m s)', 'kg/ms'], factor: 1 },
    { unit: 'kg/(m·h)', aliases: ['kg/(m*h)', 'kg/m/h', 'kg/m·h', 'kg/(m h)', 'kg/mh'], factor: 1 / HOUR },
    {
      unit: 'lb/(ft·h)',
      aliases: ['lb/(ft*h)', 'lb/ft/h', 'lb/ft·h', 'lb/(ft h)'],
      factor: POUND / FOOT / HOUR,
    },
  ],
  foulingResistance: [
    { unit: 'm²·K/W', aliases: ['m2K/W', 'm²K/W', 'm2*K/W', 'm^2*K/W', 'm2·K/W', 'm2 K/W'], factor: 1 },
    {
      unit: 'h·ft²·°F/Btu',
      aliases: ['h*ft2*F/Btu', 'h ft2 F/Btu', 'hr*ft2*F/Btu', 'h·ft2·°F/Btu', 'hft2F/Btu', 'h*ft^2*degF/Btu'],
      factor: (HOUR * FOOT ** 2 * RANKINE) / BTU,
    },
  ],
  thermalConductivity: [
    { unit: 'W/(m·K)', aliases: ['W/(m*K)', 'W/m/K', 'W/mK', 'W/m·K', 'W/(m K)'], factor: 1 },
    {
      unit: 'Btu/(h·ft·°F)',
      aliases: ['Btu/(h*ft*F)', 'Btu/h/ft/F', 'Btu/(h ft F)', 'Btu/hr-ft-F', 'Btu/(hr*ft*F)'],
      factor: BTU / HOUR / FOOT / RANKINE,
    },
  ],
  viscosity: [
    { unit: 'mPa·s', aliases: ['mPa*s', 'mPas', 'mPa s', 'cP', 'cp', 'centipoise'], factor: 1e-3 },
    { unit: 'Pa·s', aliases: ['Pa*s', 'Pas', 'Pa s', 'kg/(m*s)'], factor: 1 },
  ],
  heatFlux: [
    { unit: 'W/m²', aliases: ['W/m2', 'W/m^2'], factor: 1 },
    { unit: 'kW/m²', aliases: ['kW/m2', 'kW/m^2'], factor: 1e3 },
  ],
};

interface Affine {
  unit: string;
  factor: number;
  offset: number;
  gauge?: 1 | -1;
  onlyFor?: UnitSpec['onlyFor'];
}

/** Spellings are matched after removing spaces (so "kg / s" and "kg/s" are the same). */
function key(spelling: string): string {
  return spelling.replace(/\s+/g, '');
}

function affineFromQty(expr: string, si: string): { factor: number; offset: number } {
  const zero = Qty(0, expr).to(si).scalar;
  // A wide span keeps the factor of offset units (°F) free of cancellation error.
  const span = 1e6;
  const far = Qty(span, expr).to(si).scalar;
  return { factor: (far - zero) / span, offset: zero };
}

const FAMILY_LOOKUP = new Map<UnitFamily, Map<string, Affine>>();
/** Each family's spellings by lower case, where no two units of the family share it. */
const FAMILY_FOLDED = new Map<UnitFamily, Map<string, Affine | null>>();
const FAMILY_ACCEPTED = new Map<UnitFamily, string[]>();
for (const kind of Object.keys(UNIT_TABLE) as UnitFamily[]) {
  const map = new Map<string, Affine>();
  const folded = new Map<string, Affine | null>();
  for (const spec of UNIT_TABLE[kind]) {
    const si = QTY_SI[kind];
    let affine: { factor: number; offset: number };
    if (spec.factor !== undefined) affine = { factor: spec.factor, offset: 0 };
    else if (spec.qty !== undefined && si !== undefined) affine = affineFromQty(spec.qty, si);
    else throw new Error(`units table: ${kind} ${spec.unit} has neither factor nor js-quantities unit`);
    const entry: Affine = { unit: spec.unit, factor: affine.factor, offset: affine.offset };
    if (spec.gauge) entry.gauge = spec.gauge;
    if (spec.onlyFor) entry.onlyFor = spec.onlyFor;
    for (const s of [spec.unit, ...(spec.aliases ?? [])]) {
      map.set(key(s), entry);
      // "MW"/"mW", "mbar"/"Mbar": a leading m or M is a prefix and keeps its case.
      if (/^[mM][^aeiou]/.test(s)) continue;
      const k = key(s).toLowerCase();
      const seen = folded.get(k);
      folded.set(k, seen === undefined || seen === entry ? entry : null);
    }
  }
  FAMILY_LOOKUP.set(kind, map);
  FAMILY_FOLDED.set(kind, folded);
  FAMILY_ACCEPTED.set(
    kind,
    UNIT_TABLE[kind].map((s) => s.unit),
  );
}
/** Each kind's spellings → affine maps to SI (its family's), and its accepted canonical spellings. */
const LOOKUP = new Map<QuantityKind, Map<string, Affine>>(
  quantityKinds.map((kind) => [kind, FAMILY_LOOKUP.get(FAMILY[kind])!]),
);
const ACCEPTED = new Map<QuantityKind, string[]>(
  quantityKinds.map((kind) => [kind, FAMILY_ACCEPTED.get(FAMILY[kind])!]),
);

/** Spellings refused with a hint, because plants use them for more than one thing. */
const AMBIGUOUS: Partial<Record<UnitFamily, { test: RegExp; hint: string }[]>> = {
  pressure: [
    {
      test: /^(in\s*hg|"\s*hg|inches\s*hg|inch\s*hg)$/i,
      hint: 'a bare "inHg" is ambiguous (in plants it usually reads a vacuum): write "inHg(a)" for an absolute pressure or "inHg vac" for a vacuum below the atmosphere',
    },
  ],
  massFlow: [
    {
      test: /(^|[^a-z])tons?([^a-z]|$)/i,
      hint: '"ton" is ambiguous: write "t/h" (or "tonne/h") for metric tonnes, or "short ton/h" for US short tons',
    },
  ],
};

/** js-quantities' SI value of one unit (for the exact-factor correction of the grammar). */
function baseScalar(qty: string): number {
  return (Qty(1, qty) as unknown as { baseScalar: number }).baseScalar;
}

/** Compound spellings read by the grammar, per family; bounded, as the text comes from clients. */
const COMPOUND_CACHE = new Map<string, Affine | null>();
const COMPOUND_CACHE_SIZE = 2048;

/** A compound unit ("kW/(m^2 K)") of a family by the one grammar (server/units/grammar.ts). */
function compoundOf(family: UnitFamily, spelled: string): Affine | undefined {
  const si = QTY_SI[family];
  if (si === undefined || family === 'temperature') return undefined;
  const cacheKey = `${family}\u0000${spelled}`;
  const cached = COMPOUND_CACHE.get(cacheKey);
  if (cached !== undefined) return cached ?? undefined;
  let found: Affine | null = null;
  const compound = readCompound(spelled, baseScalar);
  if (compound) {
    try {
      const affine = affineFromQty(compound.expr, si);
      // Compounds are never offset scales: their temperatures are differences.
      if (affine.offset === 0 && Number.isFinite(affine.factor) && affine.factor > 0) {
        found = { unit: spelled, factor: affine.factor * compound.correction, offset: 0 };
      }
    } catch {
      found = null; // another dimension, or not a js-quantities unit
    }
  }
  if (COMPOUND_CACHE.size >= COMPOUND_CACHE_SIZE) COMPOUND_CACHE.clear();
  COMPOUND_CACHE.set(cacheKey, found);
  return found ?? undefined;
}

/** A unit of a family: its table spelling, the same ignoring case where unambiguous, or a compound. */
function unitOf(family: UnitFamily, spelled: string): Affine | undefined {
  const k = key(spelled);
  return (
    FAMILY_LOOKUP.get(family)!.get(k) ??
    FAMILY_FOLDED.get(family)!.get(k.toLowerCase()) ??
    compoundOf(family, spelled)
  );
}

/** Canonical spellings accepted for a kind (aliases such as "degC" for "°C" are accepted too). */
export function acceptedUnits(kind: QuantityKind): string[] {
  return [...(ACCEPTED.get(kind) ?? [])];
}

/** An input that is not a finite number with a known unit of the expected kind. */
export class UnitError extends Error {
  override readonly name = 'UnitError';
  constructor(
    /** Path of the offending input in the request, e.g. "steam.pressure". */
    readonly field: string,
    readonly input: unknown,
    readonly kind: QuantityKind,
    readonly acceptedUnits: string[],
    message: string,
  ) {
    super(message);
  }
}

const NUMBER_AND_UNIT = /^([+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)(.*)$/;

/** Lower physical bounds in SI that no unit choice can make sense of. */
const PHYSICAL_MIN: Partial<Record<UnitFamily, { min: number; max?: number; what: string }>> = {
  pressure: { min: 0, what: 'an absolute pressure cannot be negative' },
  temperature: { min: 0, what: 'an absolute temperature cannot be below 0 K' },
  massFraction: { min: 0, max: 1, what: 'a mass fraction lies between 0 and 1 (0 % to 100 %)' },
};

function kindLabel(kind: QuantityKind): string {
  return FAMILY[kind].replace(/([A-Z])/g, ' $1').toLowerCase();
}

function convert(value: number, unit: Affine, atmosphere = STANDARD_ATMOSPHERE): number {
  const si = value * unit.factor + unit.offset;
  if (unit.gauge === undefined) return si;
  return unit.gauge === 1 ? atmosphere + si : atmosphere - si;
}

/** Each kind's default unit as its affine map to SI, looked up once (the API converts every field). */
const DEFAULT_UNIT = new Map<QuantityKind, Affine>(
  quantityKinds.map((kind) => [kind, LOOKUP.get(kind)?.get(key(defaultUnits[kind])) as Affine]),
);

/** What a request tells the parser beyond the text: its atmosphere and its liquor. */
export interface ParseContext {
  /** The atmosphere gauge and vacuum readings refer to, Pa (default 101 325 Pa). */
  atmosphere?: number;
  /** The request's liquor id ("custom" for an inline one), for units that fit one liquor only. */
  liquor?: string;
  /** This field is itself the atmosphere: gauge and vacuum readings make no sense in it. */
  absoluteOnly?: boolean;
  /** This field is a pressure difference: a gauge or vacuum reading would be misread. */
  difference?: boolean;
}

/**
 * Parses a dimensional input to SI. A number is in the kind's default unit ({@link defaultUnits});
 * a string is a number followed by an optional unit ("1.4 bar", "1.4bar", "-3 °C", "2 barg",
 * "1200 W/m2-K": the grammar of server/units/grammar.ts).
 * Throws {@link UnitError} (with field, input, kind and the accepted units) for an empty string,
 * NaN, Infinity, an unknown or ambiguous unit, a unit of another kind, a unit that does not fit
 * the request's liquor, or a value no unit can make physical (negative absolute pressure or
 * temperature, a mass fraction outside 0–1).
 *
 * @param input a number in the default unit, or "value unit"
 * @param kind what the input measures
 * @param field path of the input in the request, used in the error
 * @param context the request's atmosphere (for gauge and vacuum readings) and liquor
 * @returns the value in SI (Pa, K, kg/s, J/kg, J/(kg·K), W/(m²·K), m², m, W, kg/kg, kg/m³)
 */
export function parseQuantity(
  input: number | string,
  kind: QuantityKind,
  field: string,
  context?: ParseContext,
): number {
  // The success path builds no message and copies no unit list: every quantity of every request
  // comes through here, and that work showed in profiles of the calculation routes.
  const family = FAMILY[kind];

  let value: number;
  let unit: Affine;
  let bare = false;
  if (typeof input === 'number') {
    if (!Number.isFinite(input)) {
      throw unitErrorFor(
        field,
        input,
        kind,
        `${field}: ${String(input)} is not a finite number (${kindLabel(kind)} in ${defaultUnits[kind]})`,
      );
    }
    value = input;
    unit = DEFAULT_UNIT.get(kind) as Affine;
    bare = true;
  } else if (typeof input === 'string') {
    const text = input.trim();
    if (text.length === 0) {
      throw unitErrorFor(
        field,
        input,
        kind,
        `${field}: empty; give a number with an optional unit (${listed(kind)})`,
      );
    }
    const match = NUMBER_AND_UNIT.exec(text);
    if (!match) {
      throw unitErrorFor(
        field,
        input,
        kind,
        `${field}: "${input}" does not start with a number; expected e.g. "1.4 ${exampleUnit(kind)}"`,
      );
    }
    value = Number(match[1]);
    if (!Number.isFinite(value))
      throw unitErrorFor(field, input, kind, `${field}: "${input}" is not a finite number`);
    const spelled = (match[2] ?? '').trim();
    if (spelled.length === 0) {
      unit = DEFAULT_UNIT.get(kind) as Affine;
      bare = true;
    } else {
      const found = unitOf(family, spelled);
      if (!found) throw unknownUnit(field, input, kind, spelled);
      unit = found;
    }
  } else {
    throw unitErrorFor(
      field,
      input,
      kind,
      `${field}: expected a number or a string such as "1.4 ${exampleUnit(kind)}"`,
    );
  }

  if (unit.onlyFor && context?.liquor !== undefined && !unit.onlyFor.liquors.includes(context.liquor)) {
    throw unitErrorFor(
      field,
      input,
      kind,
      `${field}: "${unit.unit}" does not fit this liquor (${context.liquor}): ${unit.onlyFor.what} (${unit.onlyFor.liquors.join(', ')}); give a mass fraction 0–1 or a mass percent such as "50 %"`,
    );
  }
  if (unit.gauge !== undefined && context?.absoluteOnly) {
    throw unitErrorFor(
      field,
      input,
      kind,
      `${field}: the atmosphere itself is an absolute pressure; "${unit.unit}" reads against it (give e.g. "99.2 kPa" or "992 mbar")`,
    );
  }
  if (unit.gauge !== undefined && context?.difference) {
    throw unitErrorFor(
      field,
      input,
      kind,
      `${field}: a pressure difference is not read against the atmosphere; "${unit.unit}" is a gauge or vacuum reading (give e.g. "5 mbar" or "0.5 kPa")`,
    );
  }
  const si = convert(value, unit, context?.atmosphere);
  const bound = PHYSICAL_MIN[family];
  if (bound && (si < bound.min || (bound.max !== undefined && si > bound.max))) {
    const hint =
      family === 'massFraction' && bare && value > 1 && value <= 100
        ? `; did you mean ${value} % (${Number((value / 100).toPrecision(12))})?`
        : '';
    const atm =
      unit.gauge !== undefined
        ? ` (read against an atmosphere of ${Number(((context?.atmosphere ?? STANDARD_ATMOSPHERE) / 1000).toPrecision(6))} kPa)`
        : '';
    throw unitErrorFor(
      field,
      input,
      kind,
      `${field}: ${String(input)} is not physical: ${bound.what}${atm}${hint}`,
    );
  }
  return si;
}

function unknownUnit(field: string, input: unknown, kind: QuantityKind, spelled: string): UnitError {
  const family = FAMILY[kind];
  const ambiguous = AMBIGUOUS[family]?.find((a) => a.test.test(spelled));
  if (ambiguous) return unitErrorFor(field, input, kind, `${field}: ${ambiguous.hint}`);
  const other = quantityKinds.find((k) => FAMILY[k] !== family && unitOf(FAMILY[k], spelled) !== undefined);
  return unitErrorFor(
    field,
    input,
    kind,
    other
      ? `${field}: "${spelled}" is a ${kindLabel(other)} unit, not a ${kindLabel(kind)} unit (${listed(kind)})`
      : `${field}: unknown unit "${spelled}" for a ${kindLabel(kind)} (${listed(kind)}; compound units follow the grammar in the API description, e.g. "W/(m2 K)", "BTU/h-ft2-F")`,
  );
}

function unitErrorFor(field: string, input: unknown, kind: QuantityKind, message: string): UnitError {
  return new UnitError(field, input, kind, acceptedUnits(kind), message);
}

/** A unit to show in an example: the first alternative spelling, else the default. */
function exampleUnit(kind: QuantityKind): string {
  const accepted = acceptedUnits(kind);
  return accepted[1] ?? accepted[0] ?? '';
}

function listed(kind: QuantityKind): string {
  return `accepted units: ${acceptedUnits(kind).join(', ')}`;
}

/** A number in the kind's default unit → SI (no parsing, no physical check: for checked numbers). */
export function fromDefaultUnit(value: number, kind: QuantityKind): number {
  return convert(value, DEFAULT_UNIT.get(kind) as Affine);
}

/** An SI value → the kind's default unit. */
export function toDefaultUnit(valueSI: number, kind: QuantityKind): number {
  const unit = DEFAULT_UNIT.get(kind) as Affine;
  return (valueSI - unit.offset) / unit.factor;
}

/**
 * Converts an SI value to the given unit of the kind (default: Ebullio's default output unit,
 * {@link defaultUnits}: °C, kPa absolute, kg/s, kJ/kg, kJ/(kg·K), kW, m², W/(m²·K), mass fraction).
 */
export function formatOutput(valueSI: number, kind: QuantityKind, unit: string = defaultUnits[kind]): number {
  const found = unitOf(FAMILY[kind], unit);
  if (!found) {
    throw new UnitError('unit', unit, kind, acceptedUnits(kind), `unknown ${kindLabel(kind)} unit "${unit}"`);
  }
  if (found.gauge === 1) return (valueSI - STANDARD_ATMOSPHERE - found.offset) / found.factor;
  if (found.gauge === -1) return (STANDARD_ATMOSPHERE - valueSI) / found.factor;
  return (valueSI - found.offset) / found.factor;
}
