"use client";
// The plant's jobs (or a customer's own) as a server-paginated table; search, status, sort and page in the URL.
import { createColumnHelper } from "@tanstack/react-table";
import Link from "next/link";
import { useMemo } from "react";
import { DataTable, features, type Columns } from "@/components/tables/data-table";
import { useServerList } from "@/components/tables/use-server-list";
import { inputClass, quietButtonClass } from "@/components/ui/field";
import { LocalTime } from "@/components/ui/local-time";
import type { JobRow } from "@/lib/jobs/jobs";
import { JOB_SORTS, STATUS_LABELS, type JobStatus } from "@/lib/jobs/schema";
import { JobStatusBadge } from "./status-badge";

const helper = createColumnHelper<typeof features, JobRow>();

export function JobsTable({ showCustomer }: { showCustomer: boolean }) {
  const { params, set, table } = useServerList<JobRow>({ key: "jobs", url: "/api/jobs", sorts: JOB_SORTS, defaultSort: "updated", defaultDir: "desc", filters: ["q", "status"] });
  const columns = useMemo(() => {
    const list: Columns<JobRow> = [
      helper.accessor("jobNumber", {
        header: "Job",
        cell: (info) => (
          <Link href={`/jobs/${info.row.original.id}`} className="whitespace-nowrap font-mono text-xs font-medium text-accent hover:underline">
            {info.getValue()}
          </Link>
        ),
      }),
      helper.accessor("title", {
        header: "Title",
        cell: (info) => (
          <div className="min-w-48">
            {info.getValue()}
            {info.row.original.press && <div className="text-xs text-ink-muted">{info.row.original.press}</div>}
          </div>
        ),
      }),
    ];
    if (showCustomer) list.push(helper.accessor("customerName", { id: "customer", header: "Customer" }));
    list.push(
      helper.accessor("status", { header: "Status", cell: (info) => <JobStatusBadge status={info.getValue()} /> }),
      helper.accessor("scanCount", { header: "Sheets", cell: (info) => <span className="tabular-nums">{info.getValue()}</span> }),
      helper.accessor("openSheetCount", { header: "Awaiting sign-off", cell: (info) => <span className="tabular-nums">{info.getValue()}</span> }),
      helper.accessor("updatedAt", { id: "updated", header: "Updated", cell: (info) => <span className="whitespace-nowrap text-ink-muted"><LocalTime at={info.getValue()} /></span> }),
    );
    return list;
  }, [showCustomer]);

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <form
          role="search"
          className="flex items-end gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            set({ q: String(new FormData(e.currentTarget).get("q") ?? "").trim() });
          }}
        >
          <div>
            <label htmlFor="jobs-q" className="block text-xs font-medium text-ink-muted">
              Job number, title{showCustomer ? " or customer" : ""}
            </label>
            <input id="jobs-q" name="q" type="search" defaultValue={params.q ?? ""} key={params.q ?? ""} className={`${inputClass} w-64`} />
          </div>
          <button type="submit" className={quietButtonClass}>
            Search
          </button>
        </form>
        <div>
          <label htmlFor="jobs-status" className="block text-xs font-medium text-ink-muted">
            Status
          </label>
          <select id="jobs-status" value={params.status ?? ""} onChange={(e) => set({ status: e.target.value })} className={`${inputClass} w-40`}>
            <option value="">Any status</option>
            {(Object.keys(STATUS_LABELS) as JobStatus[]).map((s) => (
              <option key={s} value={s}>
                {STATUS_LABELS[s]}
              </option>
            ))}
          </select>
        </div>
        {(params.q || params.status) && (
          <button type="button" className={quietButtonClass} onClick={() => set({ q: null, status: null })}>
            Clear filters
          </button>
        )}
      </div>
      <DataTable
        label="Jobs"
        columns={columns}
        rowKey={(r) => String(r.id)}
        {...table}
        empty={params.q || params.status ? "No job matches these filters." : "There are no jobs you can see yet."}
        wideOnly={["updated", "openSheetCount"]}
      />
    </div>
  );
}
