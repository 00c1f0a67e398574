/**
 * The workbench (Pinia setup store): the calculations it offers (GET /workbench/operations, each
 * with its request schema and worked example), the keys the user may run them with (GET /keys),
 * and the run itself (POST /workbench/run): the answer, or the API's problem.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { ConsoleKey, ConsoleKeyList } from '../../../shared/console/keys.js';
import type {
  WorkbenchOperation,
  WorkbenchOperationList,
  WorkbenchResult,
  WorkbenchRun,
} from '../../../shared/console/workbench.js';
import { api as defaultApi, type ApiClient, type ApiProblem, asProblem } from '../api/client.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useWorkbenchClient(next: ApiClient): void {
  client = next;
}

export const useWorkbenchStore = defineStore('workbench', () => {
  const operations = ref<WorkbenchOperation[]>([]);
  const keys = ref<ConsoleKey[]>([]);
  const loading = ref(false);
  const loadError = ref<ApiProblem | null>(null);

  const running = ref(false);
  const result = ref<WorkbenchResult | null>(null);
  const problem = ref<ApiProblem | null>(null);

  /** Keys that can still call the API (revoked and expired ones cannot). */
  const usableKeys = computed(() => keys.value.filter((k) => k.state === 'active' || k.state === 'expiring'));

  async function load(): Promise<void> {
    loading.value = true;
    loadError.value = null;
    try {
      const [ops, list] = await Promise.all([
        client.get<WorkbenchOperationList>('/workbench/operations'),
        client.get<ConsoleKeyList>('/keys'),
      ]);
      operations.value = ops.items;
      keys.value = list.items;
    } catch (err) {
      loadError.value = asProblem(err);
    } finally {
      loading.value = false;
    }
  }

  async function run(request: WorkbenchRun): Promise<void> {
    running.value = true;
    problem.value = null;
    result.value = null;
    try {
      result.value = await client.post<WorkbenchResult>('/workbench/run', request);
    } catch (err) {
      problem.value = asProblem(err);
    } finally {
      running.value = false;
    }
  }

  function clear(): void {
    result.value = null;
    problem.value = null;
  }

  return { operations, keys, usableKeys, loading, loadError, running, result, problem, load, run, clear };
});
