"use client";
// Customers as a server-paginated table; search, sort and page in the URL.
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { createColumnHelper } from "@tanstack/react-table";
import Link from "next/link";
import { DataTable, features, type Columns } from "@/components/tables/data-table";
import { fetchJson, useListParams } from "@/components/tables/use-list-params";
import { inputClass, quietButtonClass } from "@/components/ui/field";
import { LocalTime } from "@/components/ui/local-time";
import type { CustomerListItem } from "@/lib/customers/customers";
import { CUSTOMER_SORTS } from "@/lib/customers/schema";
import type { Page } from "@/lib/validation";

const helper = createColumnHelper<typeof features, CustomerListItem>();
const columns: Columns<CustomerListItem> = [
  helper.accessor("name", {
    header: "Customer",
    cell: (info) => (
      <Link href={`/customers/${info.row.original.id}/edit`} className="font-medium text-accent hover:underline" aria-label={`Edit ${info.getValue()}`}>
        {info.getValue()}
      </Link>
    ),
  }),
  helper.accessor("contactEmails", {
    id: "contacts",
    header: "Contacts for notices",
    cell: (info) =>
      info.getValue().length === 0 ? (
        <span className="text-caution">None: nobody is told of sign-offs</span>
      ) : (
        <ul className="space-y-0.5 break-all text-xs">
          {info.getValue().map((e: string) => (
            <li key={e}>{e}</li>
          ))}
        </ul>
      ),
  }),
  helper.accessor("jobCount", {
    id: "jobs",
    header: "Jobs",
    cell: (info) => (
      <Link href={`/?q=${encodeURIComponent(info.row.original.name)}`} className="tabular-nums hover:underline">
        {info.getValue()} ({info.row.original.openJobCount} open)
      </Link>
    ),
  }),
  helper.accessor("updatedAt", { id: "updated", header: "Updated", cell: (info) => <span className="whitespace-nowrap text-ink-muted"><LocalTime at={info.getValue()} /></span> }),
];

export function CustomersTable() {
  const { params, set } = useListParams();
  const sort = CUSTOMER_SORTS.includes(params.sort as (typeof CUSTOMER_SORTS)[number]) ? params.sort : "name";
  const dir = params.dir === "desc" ? "desc" : "asc";
  const page = Math.max(1, Number(params.page) || 1);
  const query = new URLSearchParams({ sort, dir, page: String(page), pageSize: "20", ...(params.q ? { q: params.q } : {}) });
  const result = useQuery({
    queryKey: ["customers", query.toString()],
    queryFn: () => fetchJson<Page<CustomerListItem>>(`/api/customers?${query}`),
    placeholderData: keepPreviousData,
  });
  return (
    <div className="space-y-3">
      <form
        role="search"
        className="flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          set({ q: String(new FormData(e.currentTarget).get("q") ?? "").trim() });
        }}
      >
        <div>
          <label htmlFor="customers-q" className="block text-xs font-medium text-ink-muted">
            Customer name
          </label>
          <input id="customers-q" name="q" type="search" defaultValue={params.q ?? ""} key={params.q ?? ""} className={`${inputClass} w-64`} />
        </div>
        <button type="submit" className={quietButtonClass}>
          Search
        </button>
        {params.q && (
          <button type="button" className={quietButtonClass} onClick={() => set({ q: null })}>
            Clear
          </button>
        )}
      </form>
      <DataTable
        label="Customers"
        columns={columns}
        rows={result.data?.rows}
        rowKey={(r) => String(r.id)}
        sortable={CUSTOMER_SORTS}
        sort={sort}
        dir={dir}
        onSort={(column, direction) => set({ sort: column, dir: direction })}
        page={page}
        pageSize={20}
        total={result.data?.total ?? 0}
        onPage={(p) => set({ page: p }, true)}
        loading={result.isFetching}
        error={result.error}
        onRetry={() => void result.refetch()}
        empty={params.q ? "No customer matches this name." : "No customers yet. Create the first one."}
        wideOnly={["updated"]}
      />
    </div>
  );
}
