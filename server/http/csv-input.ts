/**
 * The one CSV reader of every upload (batch cases, stored-liquor and console Dühring tables), so
 * they read and refuse alike: a header row (line 1) naming the columns, one record per line after
 * it, empty lines skipped, a byte-order mark ignored, cells trimmed. Every refusal names the CSV
 * line (header = line 1, so the first data row is line 2) and, where one cell is at fault, its
 * column: `line 3, column feed.massFlow`. Refused, all reported at once (at most
 * {@link MAX_CSV_ERRORS}):
 * - text csv-parse cannot read (an unclosed quote), naming the line where it stopped;
 * - a row with more or fewer cells than the header has columns (a short row is not read as
 *   empty cells: a missing cell is more often a lost separator than an intended blank);
 * - a number written with a thousands separator ("1,800", a quoted cell) or a decimal comma
 *   ("1,5"): read as a number followed by a unit it would be ",800", so it is refused instead.
 */
import { parse as parseCsv } from 'csv-parse/sync';
import { problem, type ProblemError, type ProblemFieldError } from './problem.js';

/** Most cell and row errors listed in one problem. */
export const MAX_CSV_ERRORS = 100;

export interface CsvRow {
  /** The line of the file where the record starts (header = line 1). */
  line: number;
  /** Trimmed cells, exactly one per header column. */
  cells: string[];
}

export interface CsvTable {
  /** Trimmed column names, line 1. */
  header: string[];
  rows: CsvRow[];
}

/** Where in a CSV a problem is: `line 3` or `line 3, column feed.massFlow`. */
export function csvPlace(line: number, column?: string): string {
  return column === undefined || column === '' ? `line ${line}` : `line ${line}, column ${column}`;
}

/** The 422 for errors found in a CSV, each naming its line (and column). */
export function csvRefusal(errors: ProblemFieldError[]): ProblemError {
  const first = errors[0];
  const detail =
    errors.length === 1 && first
      ? `The CSV is not valid at ${first.field}: ${first.message}.`
      : `The CSV is not valid in ${errors.length} places; each is listed in errors.`;
  return problem('validation-failed', detail, { errors: errors.slice(0, MAX_CSV_ERRORS) });
}

/** "1,800" or "-12,345.6 kg/h": digits in groups of three after a comma. */
const THOUSANDS = /^[+-]?\d{1,3}(?:,\d{3})+(?:\.\d*)?(?=$|\s|[^\d,.])/;
/** "1,5": a comma between digits where a decimal point was meant (or a separator was misplaced). */
const COMMA_IN_NUMBER = /^[+-]?\d+,\d/;

/** Why a cell cannot be read as a number with an optional unit, or undefined when it can be tried. */
export function numberFormatError(cell: string): string | undefined {
  const grouped = THOUSANDS.exec(cell);
  if (grouped) {
    return `"${cell}" has a thousands separator; thousands separators are not accepted (write ${grouped[0].replace(/,/g, '')})`;
  }
  if (COMMA_IN_NUMBER.test(cell)) {
    return `"${cell}" has a comma inside a number; write the decimal separator as a point (${cell.replace(',', '.')}) and no thousands separators`;
  }
  return undefined;
}

/**
 * Reads CSV text into its header and rows; throws a 422 problem naming lines and columns (see the
 * module comment), or 413 'payload-too-large' beyond `maxRows` data rows.
 */
export function readCsv(text: string, options: { maxRows?: number } = {}): CsvTable {
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parseCsv(text, {
      skip_empty_lines: true,
      bom: true,
      relax_column_count: true,
      info: true,
    }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (err) {
    const e = err as Error & { lines?: number };
    const message = e.message.replace(/^[^:]*:\s*/, '');
    throw csvRefusal([{ field: e.lines !== undefined ? csvPlace(e.lines) : 'file', message }]);
  }
  const [first, ...data] = records;
  const header = first?.record.map((h) => h.trim());
  if (!header || header.every((h) => h === '')) {
    throw csvRefusal([{ field: csvPlace(1), message: 'the CSV is empty: line 1 must name the columns' }]);
  }
  if (options.maxRows !== undefined && data.length > options.maxRows) {
    throw problem(
      'payload-too-large',
      `The CSV has ${data.length} data rows; at most ${options.maxRows} are accepted.`,
    );
  }
  const errors: ProblemFieldError[] = [];
  const rows: CsvRow[] = data.map(({ record, info }) => {
    // info.lines is the line where the record ends; a quoted cell may span lines.
    const spanned = record.reduce((n, c) => n + (c.match(/\n/g)?.length ?? 0), 0);
    const line = info.lines - spanned;
    const cells = record.map((c) => c.trim());
    if (cells.length !== header.length) {
      errors.push({
        field: csvPlace(line),
        message: `the row has ${cells.length} cell${cells.length === 1 ? '' : 's'} where ${header.length} are expected (${header.join(', ')})`,
        value: record.join(','),
      });
      return { line, cells };
    }
    cells.forEach((c, j) => {
      const wrong = numberFormatError(c);
      if (wrong) errors.push({ field: csvPlace(line, header[j]), message: wrong, value: c });
    });
    return { line, cells };
  });
  if (errors.length > 0) throw csvRefusal(errors);
  return { header, rows };
}
