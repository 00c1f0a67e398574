// The console's one date style and the axes its usage charts draw each series against.
// Sources: ISO 8601 calendar dates (YYYY-MM-DD) and months (YYYY-MM) (from memory).
import { describe, expect, it } from 'vitest';
import {
  overviewChartSeries,
  usageChartSeries,
  usageDaySeries,
} from '../../console/src/composables/chart-data.js';
import { formatDay, formatInstant, formatMonth } from '../../console/src/composables/dates.js';
import { isoDay, isoMonth } from '../../console/src/forms/rules.js';

describe('one date style across the console', () => {
  it('writes days as 2026-12-03 and months as 2026-12, whatever the locale', () => {
    expect(formatDay('2026-12-03T23:59:59.000Z')).toBe('2026-12-03');
    expect(formatDay('2026-12-03')).toBe('2026-12-03');
    expect(formatMonth('2026-12')).toBe('2026-12');
    expect(formatMonth('2026-12-31T12:00:00Z')).toBe('2026-12');
  });

  it('writes instants as UTC date and time with the zone named', () => {
    expect(formatInstant('2026-12-03T04:05:09.120Z')).toBe('2026-12-03 04:05 UTC');
    expect(formatInstant('2026-12-03T04:05:09.120Z', { seconds: true })).toBe('2026-12-03 04:05:09 UTC');
  });

  it('takes typed days and months only in the same style, and only real dates', () => {
    expect(isoDay('2026-12-03')).toBe(true);
    expect(isoDay('12/03/2026')).toMatch(/YYYY-MM-DD/);
    // Gregorian calendar: 2026 is not a leap year, so there is no 29 February (from memory).
    expect(isoDay('2026-02-29')).toMatch(/YYYY-MM-DD/);
    expect(isoMonth('2026-12')).toBe(true);
    expect(isoMonth('2026-13')).toMatch(/YYYY-MM/);
  });

  it('shows an unreadable value as it came rather than "Invalid Date"', () => {
    expect(formatInstant('not a date')).toBe('not a date');
  });
});

describe('usage chart axes', () => {
  const rows = [{ group: '2026-12-01', requests: 140, units: 140, errors: 44 }];

  it('draws units against the units axis and requests and failures against the requests axis', () => {
    const series = usageChartSeries(usageDaySeries(rows as never, '2026-12-01', '2026-12-02'));
    const axisOf = Object.fromEntries(series.map((s) => [s.label, s.yAxisID]));
    expect(axisOf).toEqual({ Units: 'units', Requests: 'requests', 'Failed requests': 'requests' });
    // Only units are bars: a failure count never stands beside a units bar as if comparable.
    expect(series.filter((s) => s.type === 'bar').map((s) => s.label)).toEqual(['Units']);
    expect(series.find((s) => s.label === 'Failed requests')?.data).toEqual([44, 0]);
  });

  it('draws the overview units line as straight segments on its own axis', () => {
    const series = overviewChartSeries([
      { requests: 10, units: 200, errors: 1 },
      { requests: 12, units: 0, errors: 0 },
    ]);
    const units = series.find((s) => s.label === 'Units');
    expect(units).toMatchObject({ type: 'line', yAxisID: 'units', tension: 0 });
    for (const s of series.filter((s) => s.label !== 'Units')) expect(s.yAxisID).toBe('requests');
  });
});
