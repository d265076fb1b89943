import type { DataTablePageEvent, DataTableSortEvent } from 'primevue/datatable';
import { useToast } from 'primevue/usetoast';
import { ref, shallowRef } from 'vue';
import type { ListPage } from '../../shared/api-types';
import { DEFAULT_PAGE_SIZE } from '../../shared/schemas/list-query';

export interface ListQueryBase {
  page: number;
  pageSize: number;
  sort?: string;
}

/**
 * State and handlers for a server-paged PrimeVue DataTable in lazy mode: paging and sorting events become
 * the API's `page`, `pageSize` and `sort` (DESIGN §8); `filters` are merged into every request.
 */
export function useListPage<T, F extends object>(
  fetchPage: (query: ListQueryBase & Partial<F>) => Promise<ListPage<T>>,
  initialFilters: Partial<F> = {},
) {
  const toast = useToast();
  const items = shallowRef<T[]>([]);
  const total = ref(0);
  const loading = ref(false);
  const page = ref(1);
  const pageSize = ref(DEFAULT_PAGE_SIZE);
  const sort = ref<string | undefined>(undefined);
  const filters = ref<Partial<F>>({ ...initialFilters });
  let latest = 0;

  async function load(): Promise<void> {
    const ticket = ++latest;
    loading.value = true;
    try {
      const result = await fetchPage({
        ...(filters.value as Partial<F>),
        page: page.value,
        pageSize: pageSize.value,
        sort: sort.value,
      });
      // An older answer arriving late must not overwrite a newer one.
      if (ticket !== latest) return;
      items.value = result.items;
      total.value = result.total;
    } catch (error) {
      toast.add({
        severity: 'error',
        summary: 'Could not load the list',
        detail: (error as Error).message,
        life: 6000,
      });
    } finally {
      if (ticket === latest) loading.value = false;
    }
  }

  function onPage(event: DataTablePageEvent): Promise<void> {
    page.value = event.page + 1;
    pageSize.value = event.rows;
    return load();
  }

  function onSort(event: DataTableSortEvent): Promise<void> {
    const field = typeof event.sortField === 'string' ? event.sortField : undefined;
    sort.value = field ? `${event.sortOrder === -1 ? '-' : ''}${field}` : undefined;
    page.value = 1;
    return load();
  }

  function applyFilters(next: Partial<F>): Promise<void> {
    filters.value = { ...filters.value, ...next };
    page.value = 1;
    return load();
  }

  return { items, total, loading, page, pageSize, sort, filters, load, onPage, onSort, applyFilters };
}
