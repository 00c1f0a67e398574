/**
 * One server-paged list as a store holds it (audit trail, outbox): the rows of the current page,
 * the total, loading and error flags, and the page options v-data-table-server last asked for.
 * Only the latest request's answer is kept, so a slow old page never overwrites a newer one.
 */
import { ref, type Ref } from 'vue';
import { type ApiProblem, asProblemTitledByError } from '../api/client.js';

/** What v-data-table-server's update:options carries that the server pages by. */
export interface PageOptions {
  page: number;
  itemsPerPage: number;
}

export interface PageOf<T> {
  items: T[];
  total: number;
}

export function usePagedList<T>(fetchPage: (options: PageOptions) => Promise<PageOf<T>>, first: PageOptions) {
  const items = ref([]) as Ref<T[]>;
  const total = ref(0);
  const loading = ref(false);
  const error = ref<ApiProblem | null>(null);
  const options = ref<PageOptions>({ ...first });
  let generation = 0;

  /** Loads a page (by default the last one asked for again). */
  async function load(next: PageOptions = options.value): Promise<void> {
    options.value = { page: next.page, itemsPerPage: next.itemsPerPage };
    const mine = ++generation;
    loading.value = true;
    error.value = null;
    try {
      const page = await fetchPage(options.value);
      if (mine !== generation) return;
      items.value = page.items;
      total.value = page.total;
    } catch (err) {
      if (mine === generation) error.value = asProblemTitledByError(err);
    } finally {
      if (mine === generation) loading.value = false;
    }
  }

  /** Back to an empty first page; an answer still on its way is dropped. */
  function reset(): void {
    generation++;
    items.value = [];
    total.value = 0;
    loading.value = false;
    error.value = null;
    options.value = { ...first };
  }

  return { items, total, loading, error, options, load, reset };
}
