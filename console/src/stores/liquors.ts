/**
 * The liquor library (Pinia setup store): built-in models and liquors stored by accounts
 * (GET /console-api/liquors), the charts of one liquor (GET /liquors/:id/charts, computed by
 * the engine on the server) and the upload of a Dühring table as CSV (POST /accounts/:id/liquors).
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import type {
  ConsoleLiquor,
  ConsoleLiquorCharts,
  ConsoleLiquorLibrary,
  LiquorUploadFields,
} from '../../../shared/console/liquors.js';
import {
  api as defaultApi,
  type ApiClient,
  type ApiFieldError,
  type ApiProblem,
  asProblem,
} from '../api/client.js';

let client: ApiClient = defaultApi;
/** Tests swap the client (a createApiClient with a mocked fetch). */
export function useLiquorsClient(next: ApiClient): void {
  client = next;
}

/** One refused CSV line for the error list: the server names it `line N` or `line N, column C`. */
export interface UploadLineError {
  line: number | null;
  message: string;
  value?: unknown;
}

/** Field errors of an upload problem, with the line number (and column) pulled out of the place. */
export function uploadLineErrors(errors: readonly ApiFieldError[]): UploadLineError[] {
  return errors
    .map((e) => {
      const m = /^line (\d+)(?:, column (.+))?$/.exec(e.field);
      const line = m ? Number(m[1]) : null;
      const column = m?.[2];
      const message = column
        ? `${column}: ${e.message}`
        : line === null && e.field && e.field !== 'file'
          ? `${e.field}: ${e.message}`
          : e.message;
      return { line, message, ...(e.value !== undefined ? { value: e.value } : {}) };
    })
    .sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
}

/** The multipart body of an upload: the text fields and the CSV file in `file`. */
export function uploadForm(fields: LiquorUploadFields, file: Blob, fileName = 'duhring.csv'): FormData {
  const form = new FormData();
  form.append('name', fields.name);
  if (fields.id) form.append('id', fields.id);
  if (fields.heatCapacity) form.append('heatCapacity', fields.heatCapacity);
  // A File of that name (some FormData implementations drop the third argument for a Blob).
  const named =
    file instanceof File && file.name === fileName ? file : new File([file], fileName, { type: 'text/csv' });
  form.append('file', named, fileName);
  return form;
}

export const useLiquorsStore = defineStore('liquors', () => {
  const items = ref<ConsoleLiquor[]>([]);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);
  const accountId = ref<number | null>(null);

  const charts = ref<ConsoleLiquorCharts | null>(null);
  const chartsLoading = ref(false);
  const chartsError = ref<ApiProblem | null>(null);

  const uploading = ref(false);
  const uploadError = ref<ApiProblem | null>(null);
  const uploadErrors = ref<UploadLineError[]>([]);

  async function load(): Promise<void> {
    loading.value = true;
    error.value = null;
    try {
      const body = await client.get<ConsoleLiquorLibrary>('/liquors', {
        query: { accountId: accountId.value ?? undefined },
      });
      items.value = body.items;
    } catch (err) {
      error.value = asProblem(err);
    } finally {
      loading.value = false;
    }
  }

  let generation = 0;
  async function loadCharts(liquor: Pick<ConsoleLiquor, 'id' | 'accountId'>): Promise<void> {
    const mine = ++generation;
    chartsLoading.value = true;
    chartsError.value = null;
    charts.value = null;
    try {
      const body = await client.get<ConsoleLiquorCharts>(`/liquors/${encodeURIComponent(liquor.id)}/charts`, {
        query: { accountId: liquor.accountId ?? undefined },
      });
      if (mine === generation) charts.value = body;
    } catch (err) {
      if (mine === generation) chartsError.value = asProblem(err);
    } finally {
      if (mine === generation) chartsLoading.value = false;
    }
  }

  /** Upload a Dühring CSV for an account; true when stored. Line errors land in uploadErrors. */
  async function upload(forAccount: number, fields: LiquorUploadFields, file: File): Promise<boolean> {
    uploading.value = true;
    uploadError.value = null;
    uploadErrors.value = [];
    try {
      await client.post(`/accounts/${forAccount}/liquors`, uploadForm(fields, file, file.name));
      await load();
      return true;
    } catch (err) {
      const problem = asProblem(err);
      uploadError.value = problem;
      uploadErrors.value = uploadLineErrors(problem.errors);
      return false;
    } finally {
      uploading.value = false;
    }
  }

  function clearUpload(): void {
    uploadError.value = null;
    uploadErrors.value = [];
  }

  return {
    items,
    loading,
    error,
    accountId,
    charts,
    chartsLoading,
    chartsError,
    uploading,
    uploadError,
    uploadErrors,
    load,
    loadCharts,
    upload,
    clearUpload,
  };
});
