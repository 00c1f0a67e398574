/**
 * The one CSV writer of the service (v1 batch results, console exports, billing statements):
 * RFC 4180 — CRLF record ends, fields with a comma, quote or line break quoted, quotes doubled
 * (csv-stringify does the quoting) — and text cells that a spreadsheet would evaluate as a
 * formula (=, +, -, @, tab, CR first) prefixed with a single quote (OWASP, "CSV Injection").
 */
import { stringify } from 'csv-stringify/sync';

/** Neutralises a text cell a spreadsheet would evaluate; other values pass unchanged. */
export function csvSafe(value: unknown): unknown {
  if (typeof value === 'string' && /^[=+\-@\t\r]/.test(value)) return `'${value}`;
  return value;
}

/** Rows as CSV text with a header row of `columns` (missing cells empty, dates as ISO 8601). */
export function toCsv(columns: readonly string[], rows: Iterable<Record<string, unknown>>): string {
  const records: Record<string, unknown>[] = [];
  for (const row of rows) records.push(Object.fromEntries(columns.map((c) => [c, csvSafe(row[c] ?? null)])));
  return stringify(records, {
    header: true,
    columns: [...columns],
    record_delimiter: 'windows',
    cast: { date: (d) => d.toISOString() },
  });
}
