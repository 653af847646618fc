"use client";
// One server-paginated list as the tables show it: sort, direction, page and filters read from the URL, the page
// of rows fetched from a route handler (the previous page stays on screen while the next one loads), and the
// DataTable's sorting, paging, loading and error props made from them.
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { Page } from "@/lib/validation";
import { fetchJson, useListParams } from "./use-list-params";

const PAGE_SIZE = 20;

interface Options {
  /** Query cache key and the route handler answering `?sort&dir&page&pageSize&…filters`. */
  key: string;
  url: string;
  sorts: readonly string[];
  defaultSort: string;
  defaultDir: "asc" | "desc";
  /** URL parameters passed on to the route handler as filters. */
  filters: readonly string[];
}

export function useServerList<T>(options: Options) {
  const { params, set } = useListParams();
  const sort = options.sorts.includes(params.sort) ? params.sort : options.defaultSort;
  const dir: "asc" | "desc" = params.dir === "asc" || params.dir === "desc" ? params.dir : options.defaultDir;
  const page = Math.max(1, Number(params.page) || 1);
  const query = new URLSearchParams({ sort, dir, page: String(page), pageSize: String(PAGE_SIZE) });
  for (const filter of options.filters) if (params[filter]) query.set(filter, params[filter]);
  const result = useQuery({
    queryKey: [options.key, query.toString()],
    queryFn: () => fetchJson<Page<T>>(`${options.url}?${query}`),
    placeholderData: keepPreviousData,
  });
  const table = {
    rows: result.data?.rows,
    sortable: options.sorts,
    sort,
    dir,
    onSort: (column: string, direction: "asc" | "desc") => set({ sort: column, dir: direction }),
    page,
    pageSize: PAGE_SIZE,
    total: result.data?.total ?? 0,
    onPage: (p: number) => set({ page: p }, true),
    loading: result.isFetching,
    error: result.error,
    onRetry: () => void result.refetch(),
  };
  return { params, set, table };
}
