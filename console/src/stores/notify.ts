/** The snackbar service: views push success and error messages; AppSnackbar shows them in turn. */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import { errorMessage } from '../api/client.js';

export interface Notice {
  id: number;
  kind: 'success' | 'error' | 'info' | 'warning';
  text: string;
  /** ms; errors stay longer. */
  timeout: number;
}

let nextId = 1;

export const useNotifyStore = defineStore('notify', () => {
  const queue = ref<Notice[]>([]);

  function push(kind: Notice['kind'], text: string, timeout = kind === 'error' ? 8000 : 4000): void {
    queue.value.push({ id: nextId++, kind, text, timeout });
  }
  const success = (text: string) => push('success', text);
  const info = (text: string) => push('info', text);
  /** An error or any thrown value (ApiProblem detail, else its title). */
  const error = (err: unknown, prefix?: string) =>
    push('error', prefix ? `${prefix}: ${errorMessage(err)}` : errorMessage(err));

  function shift(): void {
    queue.value.shift();
  }

  return { queue, push, success, info, error, shift };
});
