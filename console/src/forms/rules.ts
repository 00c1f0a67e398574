/**
 * v-form rules (each returns true or the message). The server validates again with the zod
 * contracts; these only spare a round trip.
 */
export type Rule = (value: unknown) => true | string;

export const required =
  (what = 'This field'): Rule =>
  (v) =>
    (v !== undefined && v !== null && String(v).trim() !== '') || `${what} is required`;

// A deliberately loose check (one @, something either side): the server has the final word.
export const email: Rule = (v) =>
  /^[^@\s]+@[^@\s]+\.[^@\s]+$/.test(String(v ?? '')) || 'Enter an e-mail address';

/** At least 12 characters: the same minimum as BOOTSTRAP_ADMIN_PASSWORD in server/config.ts. */
export const PASSWORD_MIN = 12;
export const password: Rule = (v) =>
  String(v ?? '').length >= PASSWORD_MIN || `Use at least ${PASSWORD_MIN} characters`;

export const integerBetween =
  (min: number, max: number): Rule =>
  (v) => {
    const n = Number(v);
    return (Number.isInteger(n) && n >= min && n <= max) || `Enter a whole number from ${min} to ${max}`;
  };

/** A calendar day written as the console writes days: 2026-12-03 (a real date). */
export const ISO_DAY = /^(\d{4})-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/;
export const isoDay: Rule = (v) => {
  const m = ISO_DAY.exec(String(v ?? ''));
  const real = m && new Date(`${m[0]}T00:00:00Z`).toISOString().slice(0, 10) === m[0];
  return real || 'Enter a day as YYYY-MM-DD, e.g. 2026-12-03';
};

/** A month written as the console writes months: 2026-12. */
export const ISO_MONTH = /^\d{4}-(0[1-9]|1[0-2])$/;
export const isoMonth: Rule = (v) =>
  ISO_MONTH.test(String(v ?? '')) || 'Enter a month as YYYY-MM, e.g. 2026-12';
