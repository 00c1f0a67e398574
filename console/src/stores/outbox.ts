/**
 * The outbox (Pinia setup store, development only): the latest 100 messages the local capture
 * server received (GET /console-api/outbox) and the one being read (GET /outbox/:id).
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { OutboxDetail, OutboxItem, OutboxPage } from '../../../shared/console/users.js';
import { api as defaultApi, type ApiClient, asProblemTitledByError } from '../api/client.js';
import { usePagedList, type PageOptions } from '../composables/paged-list.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useOutboxClient(next: ApiClient): void {
  client = next;
}

export const useOutboxStore = defineStore('outbox', () => {
  const list = usePagedList<OutboxItem>(
    (o: PageOptions) =>
      client.get<OutboxPage>('/outbox', { query: { page: o.page, pageSize: o.itemsPerPage } }),
    { page: 1, itemsPerPage: 100 },
  );
  const selected = ref<OutboxDetail | null>(null);
  const detailLoading = ref(false);

  /** Opens one message; a failure shows in the page's error, the message read before stays. */
  async function open(id: number): Promise<void> {
    detailLoading.value = true;
    try {
      const body = await client.get<OutboxDetail | { message: OutboxDetail }>(`/outbox/${id}`);
      selected.value = 'message' in body ? body.message : body;
    } catch (err) {
      list.error.value = asProblemTitledByError(err);
    } finally {
      detailLoading.value = false;
    }
  }

  function reset(): void {
    list.reset();
    selected.value = null;
    detailLoading.value = false;
  }

  return {
    items: list.items,
    total: list.total,
    loading: list.loading,
    error: list.error,
    selected,
    detailLoading,
    load: () => list.load(),
    open,
    reset,
  };
});
