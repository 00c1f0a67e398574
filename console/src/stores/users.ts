/**
 * People with console access (Pinia setup store): users and open invitations (GET
 * /console-api/users), the account choices for a developer's membership, and the actions —
 * invite, withdraw an invitation, change role, accounts or the active flag.
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { ConsoleAccountList } from '../../../shared/console/accounts.js';
import type {
  InvitationCreate,
  InvitationCreated,
  InvitationSummary,
  UserList,
  UserPatch,
} from '../../../shared/console/users.js';
import { api as defaultApi, type ApiClient, type ApiProblem, asProblemTitledByError } from '../api/client.js';
import type { UserSummary } from '../api/types.js';
import type { Choice } from '../composables/account-choices.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useUsersClient(next: ApiClient): void {
  client = next;
}

export const useUsersStore = defineStore('users', () => {
  const users = ref<UserSummary[]>([]);
  const invitations = ref<InvitationSummary[]>([]);
  const accounts = ref<Choice[]>([]);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);

  const inviteBusy = ref(false);
  const inviteError = ref<ApiProblem | null>(null);
  /** The invitation being withdrawn, if any. */
  const withdrawingId = ref<number | null>(null);

  async function load(): Promise<void> {
    loading.value = true;
    error.value = null;
    try {
      const list = await client.get<UserList>('/users');
      users.value = list.items;
      invitations.value = list.invitations;
    } catch (err) {
      error.value = asProblemTitledByError(err);
    } finally {
      loading.value = false;
    }
  }

  async function loadAccounts(): Promise<void> {
    try {
      accounts.value = (await client.get<ConsoleAccountList>('/accounts')).items.map((a) => ({
        title: a.name,
        value: a.id,
      }));
    } catch {
      accounts.value = [];
    }
  }

  /** An account's name for a chip; `#id` for one the list does not hold. */
  function accountName(id: number): string {
    return accounts.value.find((a) => a.value === id)?.title ?? `#${id}`;
  }

  /** Sends an invitation; the list reloads behind. Null on failure (see inviteError). */
  async function invite(body: InvitationCreate): Promise<InvitationCreated | null> {
    inviteBusy.value = true;
    inviteError.value = null;
    try {
      const created = await client.post<InvitationCreated>('/users/invitations', body);
      void load();
      return created;
    } catch (err) {
      inviteError.value = asProblemTitledByError(err);
      return null;
    } finally {
      inviteBusy.value = false;
    }
  }

  /** Withdraws an invitation (its link stops working) and reloads. Throws what the server answered. */
  async function withdraw(invitation: InvitationSummary): Promise<void> {
    withdrawingId.value = invitation.id;
    try {
      await client.post<InvitationSummary>(`/users/invitations/${invitation.id}/withdraw`, {});
      await load();
    } finally {
      withdrawingId.value = null;
    }
  }

  /** Changes a user and reloads. Throws what the server answered. */
  async function update(user: UserSummary, body: UserPatch): Promise<void> {
    await client.patch(`/users/${user.id}`, body);
    await load();
  }

  /** Forget everything (a page opens empty, so one user's view never shows for the next). */
  function reset(): void {
    users.value = [];
    invitations.value = [];
    accounts.value = [];
    loading.value = false;
    error.value = null;
    inviteBusy.value = false;
    inviteError.value = null;
    withdrawingId.value = null;
  }

  return {
    users,
    invitations,
    accounts,
    loading,
    error,
    inviteBusy,
    inviteError,
    withdrawingId,
    accountName,
    load,
    loadAccounts,
    invite,
    withdraw,
    update,
    reset,
  };
});
