/**
 * The overview (Pinia setup store): GET /console-api/overview — today and this month at a
 * glance, the busiest operations, accounts near their quota and the daily series.
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type { ConsoleOverview } from '../../../shared/console/overview.js';
import { api as defaultApi, type ApiClient, type ApiProblem, asProblemTitledByError } from '../api/client.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useOverviewClient(next: ApiClient): void {
  client = next;
}

export const useOverviewStore = defineStore('overview', () => {
  const overview = ref<ConsoleOverview | null>(null);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);
  let generation = 0;

  async function load(): Promise<void> {
    const mine = ++generation;
    loading.value = true;
    error.value = null;
    try {
      const body = await client.get<ConsoleOverview>('/overview');
      if (mine === generation) overview.value = body;
    } catch (err) {
      // the last figures stay on screen under the error
      if (mine === generation) error.value = asProblemTitledByError(err);
    } finally {
      if (mine === generation) loading.value = false;
    }
  }

  /** Forget everything (a page opens empty, so one user's figures never show for the next). */
  function reset(): void {
    generation++;
    overview.value = null;
    loading.value = false;
    error.value = null;
  }

  return { overview, loading, error, load, reset };
});
