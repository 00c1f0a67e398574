/**
 * Account and key choices for the filter bars of the request log, usage and billing pages.
 * Admins and billing users list every account (GET /accounts); a developer may not, so their
 * choices are the accounts they belong to (from the session), named by number.
 */
import { ref } from 'vue';
import type { ConsoleAccountList } from '../../../shared/console/accounts.js';
import type { ConsoleKeyList } from '../../../shared/console/keys.js';
import { api, type ApiClient } from '../api/client.js';
import type { ConsoleUser } from '../api/types.js';

export interface Choice {
  title: string;
  value: number;
}

export function useAccountChoices(client: ApiClient = api) {
  const accounts = ref<Choice[]>([]);
  const keys = ref<Choice[]>([]);

  async function loadAccounts(user: ConsoleUser | null): Promise<void> {
    if (user?.role === 'developer') {
      // A developer may not list accounts; their keys carry their accounts' names.
      const names = new Map<number, string>();
      try {
        const body = await client.get<ConsoleKeyList>('/keys');
        for (const k of body.items) names.set(k.accountId, k.accountName);
      } catch {
        // fall back to numbers
      }
      accounts.value = user.accountIds.map((id) => ({ title: names.get(id) ?? `Account ${id}`, value: id }));
      return;
    }
    try {
      const body = await client.get<ConsoleAccountList>('/accounts');
      accounts.value = body.items.map((a) => ({ title: a.name, value: a.id }));
    } catch {
      accounts.value = (user?.accountIds ?? []).map((id) => ({ title: `Account ${id}`, value: id }));
    }
  }

  async function loadKeys(accountId: number | null): Promise<void> {
    try {
      const body = await client.get<ConsoleKeyList>('/keys', {
        query: { accountId: accountId ?? undefined },
      });
      keys.value = body.items.map((k) => ({ title: `${k.name} (${k.prefix}…)`, value: k.id }));
    } catch {
      keys.value = [];
    }
  }

  function accountName(id: number | null): string {
    if (id === null) return '—';
    return accounts.value.find((a) => a.value === id)?.title ?? `Account ${id}`;
  }

  return { accounts, keys, loadAccounts, loadKeys, accountName };
}
