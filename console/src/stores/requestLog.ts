/**
 * The request log (Pinia setup store): one server-side page of GET /console-api/request-log,
 * the filters that produced it, and the detail shown in the drawer (GET /request-log/:id).
 * Paging, sorting and filtering happen on the server; this store only builds the query. "Run
 * again" (POST /request-log/:id/replay) runs the shown entry on today's engine; its answer is
 * kept with the detail it belongs to.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type {
  RequestLogDetail,
  RequestLogItem,
  RequestLogPage,
  ReplayResult,
} from '../../../shared/console/request-log.js';
import { api as defaultApi, ApiProblem, asProblem, type ApiClient } from '../api/client.js';
import {
  emptyFilters,
  filterQuery,
  pageQuery,
  type RequestLogFilters,
  type SortItem,
} from '../composables/request-log-query.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useRequestLogClient(next: ApiClient): void {
  client = next;
}

export const useRequestLogStore = defineStore('requestLog', () => {
  const filters = ref<RequestLogFilters>(emptyFilters());
  const page = ref(1);
  const pageSize = ref(25);
  const sortBy = ref<SortItem[]>([{ key: 'at', order: 'desc' }]);

  const items = ref<RequestLogItem[]>([]);
  const total = ref(0);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);

  const detail = ref<RequestLogDetail | null>(null);
  const detailLoading = ref(false);
  const detailError = ref<ApiProblem | null>(null);

  const replay = ref<ReplayResult | null>(null);
  const replayLoading = ref(false);
  const replayError = ref<ApiProblem | null>(null);

  /** Only the last request's answer is kept (a slow old page must not overwrite a new one). */
  let generation = 0;

  const query = computed(() =>
    pageQuery(filters.value, { page: page.value, pageSize: pageSize.value, sortBy: sortBy.value }),
  );
  /** Link for the CSV export of every row matching the filters (not just this page). */
  const exportUrl = computed(() => client.url('/request-log/export.csv', filterQuery(filters.value)));

  async function load(): Promise<void> {
    const mine = ++generation;
    loading.value = true;
    error.value = null;
    try {
      const body = await client.get<RequestLogPage>('/request-log', { query: query.value });
      if (mine !== generation) return;
      items.value = body.items;
      total.value = body.total;
    } catch (err) {
      if (mine !== generation) return;
      error.value = asProblem(err);
      items.value = [];
      total.value = 0;
    } finally {
      if (mine === generation) loading.value = false;
    }
  }

  /** v-data-table-server's update:options. */
  async function setOptions(options: { page: number; itemsPerPage: number; sortBy: SortItem[] }) {
    page.value = options.page;
    pageSize.value = options.itemsPerPage;
    sortBy.value = options.sortBy.length > 0 ? options.sortBy : [{ key: 'at', order: 'desc' }];
    await load();
  }

  /** New filters start again at page 1. */
  async function applyFilters(next: Partial<RequestLogFilters>): Promise<void> {
    filters.value = { ...filters.value, ...next };
    page.value = 1;
    await load();
  }

  async function resetFilters(): Promise<void> {
    filters.value = emptyFilters();
    page.value = 1;
    await load();
  }

  async function openDetail(id: number): Promise<void> {
    detailLoading.value = true;
    detailError.value = null;
    detail.value = null;
    clearReplay();
    try {
      detail.value = await client.get<RequestLogDetail>(`/request-log/${encodeURIComponent(String(id))}`);
    } catch (err) {
      detailError.value = asProblem(err);
    } finally {
      detailLoading.value = false;
    }
  }

  function closeDetail(): void {
    detail.value = null;
    detailError.value = null;
    clearReplay();
  }

  function clearReplay(): void {
    replay.value = null;
    replayError.value = null;
  }

  /** Runs the shown entry again on today's engine (charged to its account like the original). */
  async function runAgain(): Promise<void> {
    const shown = detail.value;
    if (!shown) return;
    replayLoading.value = true;
    clearReplay();
    try {
      const answer = await client.post<ReplayResult>(
        `/request-log/${encodeURIComponent(String(shown.id))}/replay`,
      );
      // The drawer may show another entry by now.
      if (detail.value?.id === shown.id) replay.value = answer;
    } catch (err) {
      if (detail.value?.id === shown.id) replayError.value = asProblem(err);
    } finally {
      replayLoading.value = false;
    }
  }

  return {
    filters,
    page,
    pageSize,
    sortBy,
    items,
    total,
    loading,
    error,
    detail,
    detailLoading,
    detailError,
    query,
    exportUrl,
    load,
    setOptions,
    applyFilters,
    resetFilters,
    openDetail,
    closeDetail,
    replay,
    replayLoading,
    replayError,
    runAgain,
  };
});
