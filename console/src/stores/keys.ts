/**
 * API keys (Pinia setup store): the keys of one account or of all the user may see
 * (GET /console-api/keys?accountId=), the account choices for the filter and the create form,
 * and the key actions — create, rotate with an overlap, revoke. A new secret is handed back to
 * the caller and never kept here.
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { ConsoleAccountList } from '../../../shared/console/accounts.js';
import type {
  ConsoleKey,
  ConsoleKeyCreate,
  ConsoleKeyList,
  ConsoleKeyWithSecret,
} from '../../../shared/console/keys.js';
import { api as defaultApi, type ApiClient, type ApiProblem, asProblemTitledByError } from '../api/client.js';
import type { Choice } from '../composables/account-choices.js';
import { useSessionStore } from './session.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useKeysClient(next: ApiClient): void {
  client = next;
}

export const useKeysStore = defineStore('keys', () => {
  const session = useSessionStore();

  const keys = ref<ConsoleKey[]>([]);
  const accountOptions = ref<Choice[]>([]);
  /** The account filter; null for every account the user may see. */
  const accountId = ref<number | null>(null);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);

  const saving = ref(false);
  const createError = ref<ApiProblem | null>(null);
  const revokeBusy = ref(false);
  const rotateBusy = ref(false);

  async function load(): Promise<void> {
    loading.value = true;
    error.value = null;
    try {
      const query = accountId.value !== null ? { accountId: accountId.value } : undefined;
      keys.value = (await client.get<ConsoleKeyList>('/keys', { query })).items;
      mergeAccountsFromKeys();
    } catch (err) {
      error.value = asProblemTitledByError(err);
    } finally {
      loading.value = false;
    }
  }

  /** Accounts named by the keys, and the user's own accounts by number, join the choices. */
  function mergeAccountsFromKeys(): void {
    const known = new Map(accountOptions.value.map((o) => [o.value, o.title]));
    for (const k of keys.value) if (!known.has(k.accountId)) known.set(k.accountId, k.accountName);
    for (const id of session.user?.accountIds ?? []) if (!known.has(id)) known.set(id, `Account ${id}`);
    accountOptions.value = [...known]
      .map(([value, title]) => ({ value, title }))
      .sort((a, b) => a.title.localeCompare(b.title));
  }

  async function loadAccounts(): Promise<void> {
    if (session.role === 'developer') return; // developers see their accounts through their keys
    try {
      const list = await client.get<ConsoleAccountList>('/accounts');
      accountOptions.value = list.items.map((a) => ({ value: a.id, title: a.name }));
    } catch {
      // names then come from the keys themselves
    }
  }

  /**
   * Creates a key; the answer (with its secret) is returned at once, not kept, and the list
   * reloads behind the secret's dialog. Null on failure (see createError).
   */
  async function create(body: ConsoleKeyCreate): Promise<ConsoleKeyWithSecret | null> {
    saving.value = true;
    createError.value = null;
    try {
      const created = await client.post<ConsoleKeyWithSecret>('/keys', body);
      void load();
      return created;
    } catch (err) {
      createError.value = asProblemTitledByError(err);
      return null;
    } finally {
      saving.value = false;
    }
  }

  /** Revokes a key; the list reloads behind. Throws what the server answered. */
  async function revoke(key: ConsoleKey): Promise<void> {
    revokeBusy.value = true;
    try {
      await client.post(`/keys/${key.id}/revoke`);
      void load();
    } finally {
      revokeBusy.value = false;
    }
  }

  /**
   * Rotates a key (the old one keeps working for `overlapSeconds`); the new secret is returned
   * at once and the list reloads behind. Throws what the server answered.
   */
  async function rotate(key: ConsoleKey, overlapSeconds: number): Promise<ConsoleKeyWithSecret> {
    rotateBusy.value = true;
    try {
      const result = await client.post<ConsoleKeyWithSecret>(`/keys/${key.id}/rotate`, { overlapSeconds });
      void load();
      return result;
    } finally {
      rotateBusy.value = false;
    }
  }

  /** Forget everything (a page opens empty, so one user's keys never show for the next). */
  function reset(): void {
    keys.value = [];
    accountOptions.value = [];
    accountId.value = null;
    loading.value = false;
    error.value = null;
    saving.value = false;
    createError.value = null;
    revokeBusy.value = false;
    rotateBusy.value = false;
  }

  return {
    keys,
    accountOptions,
    accountId,
    loading,
    error,
    saving,
    createError,
    revokeBusy,
    rotateBusy,
    load,
    loadAccounts,
    create,
    revoke,
    rotate,
    reset,
  };
});
