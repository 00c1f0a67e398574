/**
 * The console's one date style: ISO 8601-like and in UTC, the time base of metering, usage days and
 * billing months. Days read "2026-12-03", months "2026-12", instants "2026-12-03 14:05:09 UTC", the
 * same in every locale, so a page never mixes "12/3/2026" with "11-04".
 */

function parse(value: string | number | Date): Date | undefined {
  const d = value instanceof Date ? value : new Date(value);
  return Number.isNaN(d.getTime()) ? undefined : d;
}

const pad = (n: number) => String(n).padStart(2, '0');

/** "2026-12-03" (the UTC day of an instant, or a YYYY-MM-DD day as it is). */
export function formatDay(value: string | number | Date): string {
  if (typeof value === 'string' && /^\d{4}-\d{2}-\d{2}$/.test(value)) return value;
  const d = parse(value);
  return d ? d.toISOString().slice(0, 10) : String(value);
}

/** "2026-12" (a YYYY-MM month as it is, or the UTC month of an instant). */
export function formatMonth(value: string | number | Date): string {
  if (typeof value === 'string' && /^\d{4}-\d{2}$/.test(value)) return value;
  const d = parse(value);
  return d ? d.toISOString().slice(0, 7) : String(value);
}

/** "2026-12-03 14:05 UTC", or with seconds "2026-12-03 14:05:09 UTC". */
export function formatInstant(value: string | number | Date, opts: { seconds?: boolean } = {}): string {
  const d = parse(value);
  if (!d) return String(value);
  const time = `${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}${opts.seconds ? `:${pad(d.getUTCSeconds())}` : ''}`;
  return `${formatDay(d)} ${time} UTC`;
}
