/**
 * The audit trail (Pinia setup store): GET /console-api/audit, newest first, paged on the
 * server, optionally narrowed to one action ("key.revoke").
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { AuditEntry, AuditPage } from '../../../shared/console/users.js';
import { api as defaultApi, type ApiClient } from '../api/client.js';
import { usePagedList, type PageOptions } from '../composables/paged-list.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useAuditLogClient(next: ApiClient): void {
  client = next;
}

export const useAuditLogStore = defineStore('auditLog', () => {
  /** The action filter as typed; empty for every action. */
  const action = ref('');
  const list = usePagedList<AuditEntry>(
    (o: PageOptions) =>
      client.get<AuditPage>('/audit', {
        query: { page: o.page, pageSize: o.itemsPerPage, action: action.value || undefined },
      }),
    { page: 1, itemsPerPage: 25 },
  );

  /** A changed filter starts again at page 1. */
  async function applyAction(): Promise<void> {
    await list.load({ ...list.options.value, page: 1 });
  }

  function reset(): void {
    action.value = '';
    list.reset();
  }

  return {
    action,
    items: list.items,
    total: list.total,
    loading: list.loading,
    error: list.error,
    options: list.options,
    load: list.load,
    applyAction,
    reset,
  };
});
