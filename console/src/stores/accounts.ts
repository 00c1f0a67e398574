/**
 * Customer accounts (Pinia setup store): the list (GET /console-api/accounts), the price plans
 * an administrator picks from, create / edit, and the job-callback signing secret (made and shown once).
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type {
  ConsoleAccount,
  ConsoleAccountCreate,
  ConsoleAccountList,
  ConsoleAccountPatch,
  SigningSecret,
} from '../../../shared/console/accounts.js';
import type { Plan, PlansResponse } from '../../../shared/console/billing.js';
import { api as defaultApi, type ApiClient, type ApiProblem, asProblemTitledByError } from '../api/client.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useAccountsClient(next: ApiClient): void {
  client = next;
}

export const useAccountsStore = defineStore('accounts', () => {
  const accounts = ref<ConsoleAccount[]>([]);
  /** Empty when the plans could not be read: the form then takes the plan as free text. */
  const plans = ref<Plan[]>([]);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);
  const saving = ref(false);
  const formError = ref<ApiProblem | null>(null);

  async function load(): Promise<void> {
    loading.value = true;
    error.value = null;
    try {
      accounts.value = (await client.get<ConsoleAccountList>('/accounts')).items;
    } catch (err) {
      error.value = asProblemTitledByError(err);
    } finally {
      loading.value = false;
    }
  }

  async function loadPlans(): Promise<void> {
    try {
      plans.value = (await client.get<PlansResponse>('/plans')).items;
    } catch {
      plans.value = [];
    }
  }

  /**
   * Creates an account (`id` null) or changes one, then reloads. False on failure (see formError).
   */
  async function save(id: number | null, body: ConsoleAccountCreate & ConsoleAccountPatch): Promise<boolean> {
    saving.value = true;
    formError.value = null;
    try {
      if (id !== null) await client.patch(`/accounts/${id}`, body);
      else await client.post('/accounts', body);
      void load();
      return true;
    } catch (err) {
      formError.value = asProblemTitledByError(err);
      return false;
    } finally {
      saving.value = false;
    }
  }

  /**
   * Makes a new callback signing secret for the account (the old one stops signing) and returns it:
   * the only time it is shown. Null on failure (see formError).
   */
  async function rotateSigningSecret(id: number): Promise<SigningSecret | null> {
    saving.value = true;
    formError.value = null;
    try {
      return await client.post<SigningSecret>(`/accounts/${id}/signing-secret`, {});
    } catch (err) {
      formError.value = asProblemTitledByError(err);
      return null;
    } finally {
      saving.value = false;
    }
  }

  /** Forget everything (a page opens empty, so one user's accounts never show for the next). */
  function reset(): void {
    accounts.value = [];
    plans.value = [];
    loading.value = false;
    error.value = null;
    saving.value = false;
    formError.value = null;
  }

  return {
    accounts,
    plans,
    loading,
    error,
    saving,
    formError,
    load,
    loadPlans,
    save,
    rotateSigningSecret,
    reset,
  };
});
