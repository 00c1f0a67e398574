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
