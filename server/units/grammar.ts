/**
 * The one grammar of compound unit spellings, as engineers type them. It turns the text into an
 * expression js-quantities reads ("BTU/h ft2 F" → "BTU/h*ft^2*degF"); js-quantities does the
 * arithmetic. The grammar:
 *
 * - a unit is atoms (kg, h, ft, BTU, K, …) joined by products: a space, ".", "*", "·", "×" or "-";
 * - an atom may carry an exponent: "^2", a trailing digit ("m2") or a superscript ("m²");
 * - division is "/" or the word "per"; everything after the first "/" is the denominator, so
 *   "W/m2-K", "W/m^2 K", "W/(m2.K)" and "W/m2/K" all mean W/(m²·K); parentheses only group;
 * - atom names are case-insensitive where that is unambiguous ("btu", "HR", "Ft2"); one-letter
 *   atoms keep their case (K, F, C, R, h, s, d, m, g, t, T), as their other case means another
 *   unit or a prefix;
 * - inside a compound, K, °C (C, degC), °F (F, degF) and R are temperature differences;
 * - "t" and "T" are metric tonnes; a US short ton only when spelled out ("short ton").
 */

/** One atom: its js-quantities name, and its exact SI value where js-quantities rounds it. */
interface Atom {
  qty: string;
  /** SI value of one unit (NIST SP 811, Appendix B), replacing js-quantities' rounded one. */
  exact?: number;
}

/** 1 Btu_IT = 1055.05585262 J (NIST SP 811, Appendix B); js-quantities uses 1055.056 J. */
export const BTU_IT = 1055.05585262;

const ATOMS: Record<string, Atom> = {
  // mass
  g: { qty: 'g' },
  kg: { qty: 'kg' },
  t: { qty: 't' },
  T: { qty: 't' },
  tonne: { qty: 't' },
  tonnes: { qty: 't' },
  lb: { qty: 'lb' },
  lbs: { qty: 'lb' },
  lbm: { qty: 'lb' },
  klb: { qty: 'klb' },
  klbs: { qty: 'klb' },
  shortton: { qty: 'tn' }, // "short ton", spelled out
  // time
  s: { qty: 's' },
  sec: { qty: 's' },
  min: { qty: 'min' },
  h: { qty: 'h' },
  hr: { qty: 'h' },
  d: { qty: 'd' },
  day: { qty: 'd' },
  // length
  m: { qty: 'm' },
  mm: { qty: 'mm' },
  cm: { qty: 'cm' },
  ft: { qty: 'ft' },
  in: { qty: 'in' },
  inch: { qty: 'in' },
  // energy and power
  J: { qty: 'J' },
  kJ: { qty: 'kJ' },
  MJ: { qty: 'MJ' },
  BTU: { qty: 'BTU', exact: BTU_IT },
  W: { qty: 'W' },
  kW: { qty: 'kW' },
  MW: { qty: 'MW' },
  // pressure (gauge, absolute and vacuum spellings are whole units, in server/units' table)
  Pa: { qty: 'Pa' },
  kPa: { qty: 'kPa' },
  MPa: { qty: 'MPa' },
  bar: { qty: 'bar' },
  mbar: { qty: 'mbar' },
  // temperature differences
  K: { qty: 'degK' },
  degK: { qty: 'degK' },
  C: { qty: 'degC' },
  degC: { qty: 'degC' },
  '°C': { qty: 'degC' },
  F: { qty: 'degF' },
  degF: { qty: 'degF' },
  '°F': { qty: 'degF' },
  R: { qty: 'degR' },
  degR: { qty: 'degR' },
};

/** Atoms of two or more letters by lower-case name, where that name is not two atoms'. */
const FOLDED = new Map<string, Atom | null>();
for (const [name, atom] of Object.entries(ATOMS)) {
  // One letter keeps its case, and so does a leading m or M before a consonant: it is a prefix
  // ("MW" is not "mW", "mbar" not "Mbar").
  if (name.length < 2 || /^[mM][^aeiou]/.test(name)) continue;
  const k = name.toLowerCase();
  const seen = FOLDED.get(k);
  FOLDED.set(k, seen === undefined || seen?.qty === atom.qty ? atom : null);
}

function atomNamed(name: string): Atom | undefined {
  return ATOMS[name] ?? (name.length >= 2 ? (FOLDED.get(name.toLowerCase()) ?? undefined) : undefined);
}

const SUPERSCRIPT: Record<string, string> = { '¹': '1', '²': '2', '³': '3' };
const TOKEN = /^([A-Za-z°]+?)(?:\^(~?\d)|(\d)|([¹²³]))?$/;

/** A compound unit read by the grammar: its js-quantities expression and exactness correction. */
export interface Compound {
  /** js-quantities expression, e.g. "BTU/h*ft^2*degF". */
  expr: string;
  /** Multiply js-quantities' SI value by this (1 unless an atom has an exact value). */
  correction: number;
}

/** js-quantities' SI value of one atom, for the exactness correction. */
export type BaseScalarOf = (qty: string) => number;

function factors(
  part: string,
  sign: 1 | -1,
  baseScalar: BaseScalarOf,
  out: { terms: string[]; correction: number },
): boolean {
  const tokens = part.split(/[\s.*·×-]+/).filter((t) => t.length > 0);
  for (const raw of tokens) {
    const m = TOKEN.exec(raw);
    if (!m) return false;
    const atom = atomNamed(m[1]!);
    if (!atom) return false;
    const expText = m[2] ?? m[3] ?? (m[4] ? SUPERSCRIPT[m[4]] : undefined) ?? '1';
    const exp = Number(expText.replace('~', '-'));
    if (!Number.isInteger(exp) || exp === 0) return false;
    out.terms.push(exp === 1 ? atom.qty : `${atom.qty}^${exp}`);
    if (atom.exact !== undefined) out.correction *= (atom.exact / baseScalar(atom.qty)) ** (exp * sign);
  }
  return tokens.length > 0;
}

/**
 * Reads a compound unit ("1.2 kW/(m^2 K)" without its number) by the grammar above, or gives
 * undefined when the text does not follow it or names an atom it does not know.
 */
export function readCompound(text: string, baseScalar: BaseScalarOf): Compound | undefined {
  let s = text
    .trim()
    .replace(/\s+per\s+/gi, '/')
    .replace(/short[\s-]*tons?/gi, 'shortton')
    .replace(/\^\s*-\s*(\d)/g, '^~$1');
  if (s.length === 0 || s.length > 48) return undefined;
  // "/" inside parentheses ("W/(m2/K)") would flip a factor back: not part of the grammar.
  if (/\([^)]*\/[^)]*\)/.test(s)) return undefined;
  const slash = s.indexOf('/');
  const numerator = (slash === -1 ? s : s.slice(0, slash)).replace(/[()]/g, ' ');
  const denominator = slash === -1 ? '' : s.slice(slash + 1).replace(/[()/]/g, ' ');
  const num = { terms: [] as string[], correction: 1 };
  const den = { terms: [] as string[], correction: 1 };
  if (!factors(numerator, 1, baseScalar, num)) return undefined;
  if (slash !== -1 && !factors(denominator, -1, baseScalar, den)) return undefined;
  s = den.terms.length > 0 ? `${num.terms.join('*')}/${den.terms.join('*')}` : num.terms.join('*');
  return { expr: s, correction: num.correction * den.correction };
}
