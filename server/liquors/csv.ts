/**
 * Liquor data read from uploads: Dühring tables as CSV (read by the one CSV reader,
 * server/http/csv-input.ts, so every upload names its errors by line and column) and coefficient
 * lists in form fields.
 */
import { MAX_DUHRING_ROWS, type CustomLiquorDefinition } from '../../shared/contracts/index.js';
import { csvPlace, csvRefusal, readCsv } from '../http/csv-input.js';
import { r } from '../http/output.js';
import { problem, ProblemError, type ProblemFieldError } from '../http/problem.js';
import { parseQuantity, toDefaultUnit, UnitError } from '../units/index.js';

const CSV_COLUMNS = ['massFraction', 'waterBoilingPoint', 'solutionBoilingPoint'] as const;

type Duhring = NonNullable<CustomLiquorDefinition['boilingPoint']>;

/** A Dühring table read from CSV, with the CSV line of every reading. */
export interface DuhringUpload {
  boilingPoint: Duhring;
  /** lines[i][j]: the CSV line of `duhring[i].points[j]`. */
  lines: number[][];
}

/**
 * A Dühring table from CSV text: a header row naming the three columns (any order), then one
 * reading per line. A cell is a number in the API's unit (mass fraction 0–1, °C) or a number with
 * a unit ("10 %", "40 degC", "313.15 K"), converted by server/units as batch cells are. Rows are
 * grouped by mass fraction. Every bad cell is reported by line and column.
 */
export function duhringFromCsv(text: string): DuhringUpload {
  const { header, rows } = readCsv(text, { maxRows: MAX_DUHRING_ROWS });
  const index = CSV_COLUMNS.map((c) => header.indexOf(c));
  const missing = CSV_COLUMNS.filter((_, i) => index[i] === -1);
  if (missing.length > 0) {
    throw csvRefusal([
      {
        field: csvPlace(1),
        message: `the header lacks ${missing.join(', ')}; it must name ${CSV_COLUMNS.join(', ')}`,
        value: header.join(','),
      },
    ]);
  }
  const errors: ProblemFieldError[] = [];
  const groups = new Map<
    number,
    { waterBoilingPoint: number; solutionBoilingPoint: number; line: number }[]
  >();
  for (const { line, cells } of rows) {
    const read = CSV_COLUMNS.map((column, j) => {
      const place = csvPlace(line, column);
      const text = cells[index[j]!] ?? '';
      try {
        if (column === 'massFraction') return r(parseQuantity(text, 'massFraction', place));
        return r(toDefaultUnit(parseQuantity(text, 'temperature', place), 'temperature'));
      } catch (err) {
        if (!(err instanceof UnitError)) throw err;
        const message = err.message.startsWith(`${place}: `)
          ? err.message.slice(place.length + 2)
          : err.message;
        errors.push({ field: place, message, value: text });
        return undefined;
      }
    });
    if (read.some((v) => v === undefined)) continue;
    const [x, tw, ts] = read as [number, number, number];
    if (!(x >= 0 && x < 1)) {
      errors.push({
        field: csvPlace(line, 'massFraction'),
        message: 'massFraction must be at least 0 and below 1',
        value: x,
        validRange: { min: 0, max: 1, unit: '1' },
      });
      continue;
    }
    const points = groups.get(x) ?? [];
    points.push({ waterBoilingPoint: tw, solutionBoilingPoint: ts, line });
    groups.set(x, points);
  }
  if (errors.length > 0) throw csvRefusal(errors);
  if (groups.size === 0) {
    throw csvRefusal([{ field: csvPlace(1), message: 'the CSV has a header but no data rows' }]);
  }
  const sorted = [...groups.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([massFraction, points]) => ({
      massFraction,
      points: points.sort((a, b) => a.waterBoilingPoint - b.waterBoilingPoint),
    }));
  return {
    boilingPoint: {
      duhring: sorted.map(({ massFraction, points }) => ({
        massFraction,
        points: points.map(({ waterBoilingPoint, solutionBoilingPoint }) => ({
          waterBoilingPoint,
          solutionBoilingPoint,
        })),
      })),
    },
    lines: sorted.map(({ points }) => points.map((p) => p.line)),
  };
}

const DUHRING_PATH = /(?:definition\.)?boilingPoint\.duhring\[(\d+)\](?:\.points\[(\d+)\])?(?:\.(\w+))?/g;

/**
 * A problem about a definition built from an uploaded table, told in the table's terms: a path
 * inside `definition.boilingPoint.duhring[i].points[j]` (from the contract or the engine, such as a
 * negative boiling-point rise) becomes the CSV line and column it came from. Other errors pass.
 */
export function inCsvTerms(err: unknown, upload: DuhringUpload): unknown {
  if (!(err instanceof ProblemError) || !err.errors) return err;
  const place = (text: string): string =>
    text.replace(DUHRING_PATH, (whole, i: string, j: string | undefined, column: string | undefined) => {
      const group = upload.lines[Number(i)];
      const line = j === undefined ? group?.[0] : group?.[Number(j)];
      if (line === undefined) return whole;
      const named =
        column !== undefined && (CSV_COLUMNS as readonly string[]).includes(column) ? column : undefined;
      return j === undefined && named === undefined && group && group.length > 1
        ? `lines ${group.join(', ')}`
        : csvPlace(line, named);
    });
  return new ProblemError({
    status: err.status,
    type: err.type,
    title: err.title,
    detail: err.detail === undefined ? undefined : place(err.detail),
    errors: err.errors.map((e) => ({ ...e, field: place(e.field), message: place(e.message) })),
    headers: err.headers,
  });
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
