/**
 * Billing (Pinia setup store): price plans, the monthly statements, a statement's detail, and
 * the two billing actions — generate the drafts of a month, finalize one statement into a
 * provider invoice. "Paid" arrives later from the provider's webhook; reload to see it.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type {
  FinalizeStatementResponse,
  GenerateStatementsResponse,
  Plan,
  PlansResponse,
  Statement,
  StatementDetail,
  StatementsResponse,
  StatementStatus,
} from '../../../shared/console/billing.js';
import { api as defaultApi, type ApiClient, type ApiProblem, type Query, asProblem } from '../api/client.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useBillingClient(next: ApiClient): void {
  client = next;
}

/** The UTC month before `now`, YYYY-MM: the month one usually bills. */
export function previousUtcMonth(now: Date): string {
  const d = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth() - 1, 1));
  return d.toISOString().slice(0, 7);
}

/**
 * True once a UTC calendar month is over (from 00:00 UTC on the first of the next month): only
 * then is its usage final and may its statement be finalized (the server enforces the same).
 */
export function monthIsOver(month: string, now: Date): boolean {
  const m = /^(\d{4})-(\d{2})$/.exec(month);
  if (!m) return false;
  return now.getTime() >= Date.UTC(Number(m[1]), Number(m[2]), 1);
}

export interface StatementFilters {
  month: string | null;
  accountId: number | null;
  status: StatementStatus | null;
}

export function statementsQuery(f: StatementFilters): Query {
  return { month: f.month ?? undefined, accountId: f.accountId ?? undefined, status: f.status ?? undefined };
}

export const useBillingStore = defineStore('billing', () => {
  const plans = ref<Plan[]>([]);
  const plansError = ref<ApiProblem | null>(null);

  const filters = ref<StatementFilters>({
    month: previousUtcMonth(new Date()),
    accountId: null,
    status: null,
  });
  const statements = ref<Statement[]>([]);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);

  const detail = ref<StatementDetail | null>(null);
  const detailLoading = ref(false);
  const detailError = ref<ApiProblem | null>(null);

  const generating = ref(false);
  const lastGenerate = ref<GenerateStatementsResponse | null>(null);
  const finalizing = ref(false);
  const lastFinalize = ref<FinalizeStatementResponse | null>(null);
  const actionError = ref<ApiProblem | null>(null);

  const planByName = computed(() => new Map(plans.value.map((p) => [p.name, p])));

  async function loadPlans(): Promise<void> {
    plansError.value = null;
    try {
      plans.value = (await client.get<PlansResponse>('/plans')).items;
    } catch (err) {
      plansError.value = asProblem(err);
    }
  }

  let generation = 0;
  async function loadStatements(): Promise<void> {
    const mine = ++generation;
    loading.value = true;
    error.value = null;
    try {
      const body = await client.get<StatementsResponse>('/statements', {
        query: statementsQuery(filters.value),
      });
      if (mine === generation) statements.value = body.items;
    } catch (err) {
      if (mine === generation) error.value = asProblem(err);
    } finally {
      if (mine === generation) loading.value = false;
    }
  }

  async function applyFilters(next: Partial<StatementFilters>): Promise<void> {
    filters.value = { ...filters.value, ...next };
    await loadStatements();
  }

  async function openDetail(id: number): Promise<void> {
    actionError.value = null;
    detailLoading.value = true;
    detailError.value = null;
    try {
      detail.value = await client.get<StatementDetail>(`/statements/${id}`);
    } catch (err) {
      detailError.value = asProblem(err);
    } finally {
      detailLoading.value = false;
    }
  }

  function closeDetail(): void {
    detail.value = null;
    detailError.value = null;
    lastFinalize.value = null;
  }

  async function generate(month: string): Promise<GenerateStatementsResponse | null> {
    generating.value = true;
    actionError.value = null;
    try {
      const body = await client.post<GenerateStatementsResponse>('/statements/generate', { month });
      lastGenerate.value = body;
      filters.value = { ...filters.value, month };
      await loadStatements();
      return body;
    } catch (err) {
      actionError.value = asProblem(err);
      return null;
    } finally {
      generating.value = false;
    }
  }

  async function finalize(id: number): Promise<FinalizeStatementResponse | null> {
    finalizing.value = true;
    actionError.value = null;
    try {
      const body = await client.post<FinalizeStatementResponse>(`/statements/${id}/finalize`);
      lastFinalize.value = body;
      detail.value = body.statement;
      const i = statements.value.findIndex((s) => s.id === id);
      if (i >= 0) statements.value.splice(i, 1, body.statement);
      return body;
    } catch (err) {
      actionError.value = asProblem(err);
      return null;
    } finally {
      finalizing.value = false;
    }
  }

  function csvUrl(id: number): string {
    return client.url(`/statements/${id}/export.csv`);
  }

  return {
    plans,
    plansError,
    planByName,
    filters,
    statements,
    loading,
    error,
    detail,
    detailLoading,
    detailError,
    generating,
    lastGenerate,
    finalizing,
    lastFinalize,
    actionError,
    loadPlans,
    loadStatements,
    applyFilters,
    openDetail,
    closeDetail,
    generate,
    finalize,
    csvUrl,
  };
});
