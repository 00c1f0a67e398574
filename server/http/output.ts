/**
 * Output formatting: SI results → display units, rounded to 12 significant digits, and the
 * `provenance` of a calculation.
 */
import { defaultUnits, type QuantityKind } from '../../shared/contracts/index.js';
import { toDefaultUnit } from '../units/index.js';

/** SI value → display (default) unit of its kind (server/units holds the unit table). */
export function siToDisplay(valueSI: number, kind: QuantityKind): number {
  return toDefaultUnit(valueSI, kind);
}

export function displayNumber(valueSI: number, kind: QuantityKind | undefined): number {
  if (!kind || !Number.isFinite(valueSI)) return valueSI;
  return roundForDisplay(siToDisplay(valueSI, kind));
}

/** 10^0 … 10^22, each exactly representable as a double. */
const EXACT_POWERS_OF_TEN = Array.from({ length: 23 }, (_, i) => 10 ** i);

/**
 * 12 significant digits: hides binary noise like 0.30000000000000004 in results, messages and
 * ranges. Every output number passes here, and `Number(v.toPrecision(12))` (a string made and
 * parsed per number) showed in profiles of the calculation routes, so the usual magnitudes are
 * rounded arithmetically: |v|·10^d is rounded to an integer and divided by 10^d, an exact power
 * of ten, which gives the double nearest to the 12-digit decimal. It can differ from
 * toPrecision(12) only in the 12th digit of a value within an ulp of a rounding tie (tested
 * against toPrecision on random values). Other magnitudes, and non-finite values, go the old way.
 */
export function roundForDisplay(v: number): number {
  const a = Math.abs(v);
  if (a >= 1e-10 && a < 1e11) {
    const d = 11 - Math.floor(Math.log10(a));
    const scale = EXACT_POWERS_OF_TEN[d];
    if (scale !== undefined) {
      const rounded = Math.round(a * scale) / scale;
      return v < 0 ? -rounded : rounded;
    }
  }
  return Number.isFinite(v) ? Number(v.toPrecision(12)) : v;
}

export function displayRange(
  range: { min: number; max: number; unit: string },
  kind: QuantityKind | undefined,
): { min: number; max: number; unit: string } {
  if (!kind) return range;
  return {
    min: displayNumber(range.min, kind),
    max: displayNumber(range.max, kind),
    unit: defaultUnits[kind].symbol,
  };
}

/** Rounds to 12 significant digits for output (keeps JSON free of binary noise). */
export function r(value: number): number {
  return roundForDisplay(value);
}

export function display(valueSI: number, kind: QuantityKind): number {
  return roundForDisplay(siToDisplay(valueSI, kind));
}

/** One model used by a calculation, for `provenance`. */
export interface ModelRef {
  id: string;
  source: string;
  /** For a stored liquor: the version of its definition that was used. */
  version?: number;
}

/** `provenance` of a calculation response: engine version and every model used (deduplicated). */
export function provenance(engineVersion: string, models: readonly ModelRef[]) {
  const seen = new Set<string>();
  const unique = models.filter((m) => (seen.has(m.id) ? false : (seen.add(m.id), true)));
  return { engineVersion, models: unique };
}

/**
 * A number for a message, in the display unit of its kind: temperatures to 0.01 (°C or K),
 * everything else to `digits` significant digits (4 unless a bound needs more to differ).
 */
export function messageNumber(valueDisplay: number, kind: QuantityKind | undefined, digits = 4): number {
  if (!Number.isFinite(valueDisplay)) return valueDisplay;
  if (kind === 'temperature' || kind === 'temperatureDifference') {
    const scale = 10 ** Math.max(2, digits - 2);
    return Math.round(valueDisplay * scale) / scale;
  }
  return Number(valueDisplay.toPrecision(Math.min(Math.max(digits, 1), 15)));
}

/** The unit of a kind as a message writes it after a number ("" for a fraction: x = 0.45). */
function messageUnit(kind: QuantityKind): string {
  if (kind === 'massFraction' || kind === 'fraction') return '';
  if (kind === 'temperatureDifference') return ' K';
  return ` ${defaultUnits[kind].label.replace(' absolute', '')}`;
}

/** "128.35 °C", "206.4 kPa", "0.45": an SI value as a message says it, in display units. */
export function sayQuantity(valueSI: number, kind: QuantityKind, digits = 4): string {
  return `${String(messageNumber(siToDisplay(valueSI, kind), kind, digits))}${messageUnit(kind)}`;
}

/**
 * A value and its range as a message says them: rounded for reading, with more digits where
 * rounding would make the value look equal to the bound it crossed.
 */
export function sayValueAndRange(
  valueSI: number,
  range: { min: number; max: number },
  kind: QuantityKind,
): { value: string; min: string; max: string } {
  let digits = 4;
  for (;;) {
    const say = (v: number) => (Number.isFinite(v) ? sayQuantity(v, kind, digits) : String(v));
    const out = { value: say(valueSI), min: say(range.min), max: say(range.max) };
    const clash =
      (out.value === out.min && valueSI !== range.min) || (out.value === out.max && valueSI !== range.max);
    if (!clash || digits >= 12) return out;
    digits += 2;
  }
}
