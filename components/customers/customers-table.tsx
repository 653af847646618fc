"use client";
// Customers as a server-paginated table; search, sort and page in the URL.
import { createColumnHelper } from "@tanstack/react-table";
import Link from "next/link";
import { DataTable, features, type Columns } from "@/components/tables/data-table";
import { useServerList } from "@/components/tables/use-server-list";
import { inputClass, quietButtonClass } from "@/components/ui/field";
import { LocalTime } from "@/components/ui/local-time";
import type { CustomerListItem } from "@/lib/customers/customers";
import { CUSTOMER_SORTS } from "@/lib/customers/schema";

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
  const { params, set, table } = useServerList<CustomerListItem>({ key: "customers", url: "/api/customers", sorts: CUSTOMER_SORTS, defaultSort: "name", defaultDir: "asc", filters: ["q"] });
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
        rowKey={(r) => String(r.id)}
        {...table}
        empty={params.q ? "No customer matches this name." : "No customers yet. Create the first one."}
        wideOnly={["updated"]}
      />
    </div>
  );
}
