// The one CSV writer (server/http/csv.ts) used by batch results, console exports and statements.
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { csvSafe, toCsv } from '../../server/http/csv.js';

describe('CSV writer', () => {
  it('follows RFC 4180: header row, CRLF record ends, quoted commas, quotes and line breaks', () => {
    // RFC 4180 §2 (from memory): CRLF line breaks; fields with commas, double quotes or line
    // breaks are enclosed in double quotes; an embedded double quote is doubled.
    const text = toCsv(
      ['name', 'note', 'units'],
      [{ name: 'Plant, North', note: 'say "hi"\nthen', units: 5 }],
    );
    expect(text).toBe('name,note,units\r\n"Plant, North","say ""hi""\nthen",5\r\n');
    expect(parse(text, { columns: true })).toEqual([
      { name: 'Plant, North', note: 'say "hi"\nthen', units: '5' },
    ]);
  });

  it('prefixes text a spreadsheet would evaluate, and leaves numbers alone', () => {
    // OWASP "CSV Injection" (from memory): cells starting with =, +, -, @, tab or CR.
    for (const t of ['=1+1', '+x', '-2 degC', '@SUM(A1)', '\tx']) expect(csvSafe(t)).toBe(`'${t}`);
    expect(csvSafe(-2)).toBe(-2);
    expect(csvSafe('caustic')).toBe('caustic');
    expect(toCsv(['v'], [{ v: '=HYPERLINK("x")' }, { v: -1.5 }])).toBe(
      'v\r\n"\'=HYPERLINK(""x"")"\r\n-1.5\r\n',
    );
  });

  it('leaves a missing cell empty and writes dates as ISO 8601', () => {
    const text = toCsv(['a', 'b'], [{ a: new Date('2031-03-01T00:00:00Z') }]);
    expect(text).toBe('a,b\r\n2031-03-01T00:00:00.000Z,\r\n');
  });
});
