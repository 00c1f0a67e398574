/**
 * The request log (Pinia setup store): one server-side page of GET /console-api/request-log,
 * the filters that produced it, and the detail shown in the drawer (GET /request-log/:id).
 * Paging, sorting and filtering happen on the server; this store only builds the query.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type {
  RequestLogDetail,
  RequestLogItem,
  RequestLogPage,
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
  };
});
