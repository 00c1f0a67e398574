/**
 * The usage page: its query (UTC days, `to` inclusive), the day series behind the chart (every
 * calendar day of the range, zero where the roll-up has no row) and the three groupings it loads.
 */
import { createPinia, setActivePinia } from 'pinia';
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { createApiClient } from '../../console/src/api/client.js';
import { daysBetween, usageDaySeries } from '../../console/src/composables/chart-data.js';
import { firstOfUtcMonth, useUsageClient, useUsageStore, utcDay } from '../../console/src/stores/usage.js';

beforeEach(() => setActivePinia(createPinia()));

describe('usage day series', () => {
  it('has 29 days for February of a leap year and 28 for a common year', () => {
    // Source: Gregorian calendar rule — divisible by 4, except centuries not divisible by 400 (2032 leap, 2100 not) (from memory)
    expect(daysBetween('2032-02-01', '2032-02-29')).toHaveLength(29);
    expect(daysBetween('2100-02-01', '2100-03-01').at(-2)).toBe('2100-02-28');
  });

  it('counts `to` in and crosses a month end without skipping a day', () => {
    // Source: calendar — 30 April is followed by 1 May; an inclusive range 28 Apr–2 May has 5 days (from memory)
    expect(daysBetween('2031-04-28', '2031-05-02')).toEqual([
      '2031-04-28',
      '2031-04-29',
      '2031-04-30',
      '2031-05-01',
      '2031-05-02',
    ]);
  });

  it('puts zero on days without usage and keeps the roll-up’s figures on the others', () => {
    const rows = [
      { group: '2031-04-29', label: '2031-04-29', requests: 12, units: 30, errors: 2 },
      { group: '2031-05-01', label: '2031-05-01', requests: 4, units: 4, errors: 0 },
    ];
    const s = usageDaySeries(rows, '2031-04-28', '2031-05-02');
    expect(s.units).toEqual([0, 30, 0, 4, 0]);
    expect(s.requests).toEqual([0, 12, 0, 4, 0]);
    expect(s.errors).toEqual([0, 2, 0, 0, 0]);
  });

  it('takes the default range in UTC: the month of a late-evening time west of Greenwich is the UTC one', () => {
    // Source: ISO 8601 / UTC — 2031-04-30T23:30−05:00 is 2031-05-01T04:30Z (from memory)
    const t = new Date('2031-04-30T23:30:00-05:00');
    expect(utcDay(t)).toBe('2031-05-01');
    expect(firstOfUtcMonth(t)).toBe('2031-05-01');
  });
});

describe('usage store', () => {
  it('asks the server three times with the same range, once per grouping', async () => {
    const urls: string[] = [];
    const fetch = vi.fn(async (url: string) => {
      urls.push(url);
      const groupBy = new URL(url, 'http://x').searchParams.get('groupBy');
      return new Response(
        JSON.stringify({
          from: '2031-04-01',
          to: '2031-04-30',
          groupBy,
          accountIds: [2],
          totals: { requests: 5, units: 9, errors: 1 },
          rows: [],
        }),
        { status: 200, headers: { 'content-type': 'application/json' } },
      );
    });
    useUsageClient(
      createApiClient({ fetch: fetch as unknown as typeof globalThis.fetch, readCookie: () => 't' }),
    );
    const store = useUsageStore();
    await store.applyFilters({ accountId: 2, from: '2031-04-01', to: '2031-04-30' });
    // Source: shared/console/usage.ts UsageQuerySchema (groupBy ∈ day|operation|account)
    expect(urls.sort()).toEqual([
      '/console-api/usage?accountId=2&from=2031-04-01&to=2031-04-30&groupBy=account',
      '/console-api/usage?accountId=2&from=2031-04-01&to=2031-04-30&groupBy=day',
      '/console-api/usage?accountId=2&from=2031-04-01&to=2031-04-30&groupBy=operation',
    ]);
    expect(store.totals?.units).toBe(9);
    expect(store.exportUrl).toBe('/console-api/usage/export.csv?accountId=2&from=2031-04-01&to=2031-04-30');
  });
});
