/** Liquor data read from uploads: Dühring tables as CSV and coefficient lists in form fields. */
import { parse as parseCsv } from 'csv-parse/sync';
import { MAX_DUHRING_ROWS, type CustomLiquorDefinition } from '../../shared/contracts/index.js';
import { problem, type ProblemFieldError } from '../http/problem.js';

const CSV_COLUMNS = ['massFraction', 'waterBoilingPoint', 'solutionBoilingPoint'] as const;

/**
 * A Dühring table from CSV text: a header row naming the three columns (any order), then one
 * reading per line. Rows are grouped by mass fraction. Every bad row is reported by line number.
 */
export function duhringFromCsv(
  text: string,
  field = 'file',
): NonNullable<CustomLiquorDefinition['boilingPoint']> {
  let records: string[][];
  try {
    records = parseCsv(text, {
      skip_empty_lines: true,
      trim: true,
      relax_column_count: true,
      bom: true,
    }) as string[][];
  } catch (err) {
    throw problem('validation-failed', `The CSV could not be read: ${(err as Error).message}`, {
      errors: [{ field, message: (err as Error).message }],
    });
  }
  const header = records[0];
  if (!header) {
    throw problem('validation-failed', 'The CSV is empty.', {
      errors: [{ field, message: 'no header row' }],
    });
  }
  const index = CSV_COLUMNS.map((c) => header.indexOf(c));
  const missing = CSV_COLUMNS.filter((_, i) => index[i] === -1);
  if (missing.length > 0) {
    throw problem('validation-failed', `The CSV header lacks ${missing.join(', ')}.`, {
      errors: [
        {
          field: `${field}:line 1`,
          message: `header must name ${CSV_COLUMNS.join(', ')}`,
          value: header.join(','),
        },
      ],
    });
  }
  if (records.length - 1 > MAX_DUHRING_ROWS) {
    throw problem(
      'payload-too-large',
      `The table has ${records.length - 1} rows; at most ${MAX_DUHRING_ROWS} are accepted.`,
    );
  }
  const errors: ProblemFieldError[] = [];
  const lines = new Map<number, { waterBoilingPoint: number; solutionBoilingPoint: number }[]>();
  records.slice(1).forEach((row, i) => {
    const line = i + 2;
    const values = index.map((k) => Number(row[k] ?? ''));
    const bad = CSV_COLUMNS.filter(
      (_, j) => !Number.isFinite(values[j]) || (row[index[j]!] ?? '').trim() === '',
    );
    if (bad.length > 0) {
      errors.push({
        field: `${field}:line ${line}`,
        message: `not a number: ${bad.join(', ')}`,
        value: row.join(','),
      });
      return;
    }
    const [x, tw, ts] = values as [number, number, number];
    if (!(x >= 0 && x < 1)) {
      errors.push({
        field: `${field}:line ${line}`,
        message: 'massFraction must be at least 0 and below 1',
        value: x,
        validRange: { min: 0, max: 1, unit: '1' },
      });
      return;
    }
    const points = lines.get(x) ?? [];
    points.push({ waterBoilingPoint: tw, solutionBoilingPoint: ts });
    lines.set(x, points);
  });
  if (errors.length > 0) {
    throw problem('validation-failed', `${errors.length} row(s) of the CSV are not valid.`, {
      errors: errors.slice(0, 100),
    });
  }
  if (lines.size === 0) {
    throw problem('validation-failed', 'The CSV has no data rows.', {
      errors: [{ field, message: 'no data rows' }],
    });
  }
  return {
    duhring: [...lines.entries()]
      .sort((a, b) => a[0] - b[0])
      .map(([massFraction, points]) => ({
        massFraction,
        points: points.sort((a, b) => a.waterBoilingPoint - b.waterBoilingPoint),
      })),
  };
}

/** Polynomial coefficients sent as a form field ("4.18,-2.4"). */
export function coefficientsField(text: unknown, field: string): number[] {
  const parts = typeof text === 'string' ? text.split(/[,;\s]+/).filter(Boolean) : [];
  const values = parts.map(Number);
  if (values.length === 0 || values.some((v) => !Number.isFinite(v))) {
    throw problem('validation-failed', `${field} must be comma-separated numbers`, {
      errors: [{ field, message: 'must be comma-separated numbers, e.g. "4.18,-2.4"', value: text }],
    });
  }
  return values;
}
