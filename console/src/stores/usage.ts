/**
 * Usage (Pinia setup store): the daily roll-up from GET /console-api/usage, fetched three ways
 * for one filter (per day for the chart, per operation and per account for the tables).
 * Days are UTC calendar days and `to` is inclusive, as the server counts them.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { UsageFigures, UsageReport, UsageRow } from '../../../shared/console/usage.js';
import { api as defaultApi, type ApiClient, type ApiProblem, type Query, asProblem } from '../api/client.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useUsageClient(next: ApiClient): void {
  client = next;
}

/** Today as a UTC calendar day, YYYY-MM-DD. */
export function utcDay(now: Date): string {
  return now.toISOString().slice(0, 10);
}

/** The first day of `now`'s UTC month, YYYY-MM-01 (the server's default `from`). */
export function firstOfUtcMonth(now: Date): string {
  return `${now.toISOString().slice(0, 7)}-01`;
}

export interface UsageFilters {
  accountId: number | null;
  from: string;
  to: string;
}

/** The query of GET /usage (and the CSV export without groupBy). */
export function usageQuery(f: UsageFilters, groupBy?: 'day' | 'operation' | 'account'): Query {
  return { accountId: f.accountId ?? undefined, from: f.from, to: f.to, groupBy };
}

export const useUsageStore = defineStore('usage', () => {
  const now = new Date();
  const filters = ref<UsageFilters>({ accountId: null, from: firstOfUtcMonth(now), to: utcDay(now) });

  const byDay = ref<UsageRow[]>([]);
  const byOperation = ref<UsageRow[]>([]);
  const byAccount = ref<UsageRow[]>([]);
  const totals = ref<UsageFigures | null>(null);
  /** The range the server reports for the last answer (it fills in defaults). */
  const range = ref<{ from: string; to: string } | null>(null);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);

  const exportUrl = computed(() => client.url('/usage/export.csv', usageQuery(filters.value)));

  let generation = 0;

  async function load(): Promise<void> {
    const mine = ++generation;
    loading.value = true;
    error.value = null;
    try {
      const [day, operation, account] = await Promise.all(
        (['day', 'operation', 'account'] as const).map((g) =>
          client.get<UsageReport>('/usage', { query: usageQuery(filters.value, g) }),
        ),
      );
      if (mine !== generation) return;
      byDay.value = day!.rows;
      byOperation.value = operation!.rows;
      byAccount.value = account!.rows;
      totals.value = day!.totals;
      range.value = { from: day!.from, to: day!.to };
    } catch (err) {
      if (mine !== generation) return;
      error.value = asProblem(err);
    } finally {
      if (mine === generation) loading.value = false;
    }
  }

  async function applyFilters(next: Partial<UsageFilters>): Promise<void> {
    filters.value = { ...filters.value, ...next };
    await load();
  }

  return {
    filters,
    byDay,
    byOperation,
    byAccount,
    totals,
    range,
    loading,
    error,
    exportUrl,
    load,
    applyFilters,
  };
});
