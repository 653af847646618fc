"use client";
// The append-only audit trail as a paginated table, newest first: who, what, when (in the reader's time zone),
// details. Filter by kind of event and by person; both live in the URL.
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { createColumnHelper } from "@tanstack/react-table";
import { DataTable, features, type Columns } from "@/components/tables/data-table";
import { fetchJson, useListParams } from "@/components/tables/use-list-params";
import { inputClass, quietButtonClass } from "@/components/ui/field";
import { LocalTime } from "@/components/ui/local-time";
import type { AuditPage, AuditRow } from "@/lib/audit-trail";

const ACTION_LABELS: Record<string, string> = {
  "customer.create": "Customer created",
  "customer.update": "Customer changed",
  "job.create": "Job created",
  "job.update": "Job changed",
  "job.status_change": "Job status changed",
  "artwork.upload": "Artwork uploaded",
  "artwork.approve": "Artwork approved",
  "artwork.excluded_areas": "Excluded areas set",
  "scan.upload": "Scan uploaded",
  "inspection.retry": "Inspection retried",
  "finding.decide": "Finding decided",
  "sheet.signoff": "Sheet signed off",
  "sheet.reopen": "Sheet reopened",
  "user.invite": "Person invited",
  "user.role_change": "Role changed",
};
export const actionLabel = (action: string) => ACTION_LABELS[action] ?? action;

const PAGE_SIZE = 25;

function value(v: unknown): string {
  if (v === null || v === undefined) return "—";
  if (typeof v === "object") return JSON.stringify(v);
  return String(v);
}

function Details({ details }: { details: Record<string, unknown> | null }) {
  if (!details || Object.keys(details).length === 0) return <span className="text-ink-muted">—</span>;
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-2 text-xs">
      {Object.entries(details).map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-muted">{k}</dt>
          <dd className="break-all font-mono">{value(v)}</dd>
        </div>
      ))}
    </dl>
  );
}

const helper = createColumnHelper<typeof features, AuditRow>();
const columns: Columns<AuditRow> = [
  helper.accessor("at", { header: "When", cell: (info) => <span className="whitespace-nowrap"><LocalTime at={info.getValue()} withZone /></span> }),
  helper.accessor("actorName", { id: "who", header: "Who", cell: (info) => info.getValue() ?? <span className="text-ink-muted">Tympan (system)</span> }),
  helper.accessor("action", {
    header: "What",
    cell: (info) => (
      <div>
        <div className="font-medium">{actionLabel(info.getValue())}</div>
        <div className="font-mono text-xs text-ink-muted">
          {info.row.original.subjectType.replace("_", " ")} {info.row.original.subjectId}
        </div>
      </div>
    ),
  }),
  helper.accessor("details", { header: "Details", cell: (info) => <Details details={info.getValue()} /> }),
];

export function AuditTrail({ endpoint, label }: { endpoint: string; label: string }) {
  const { params, set } = useListParams();
  const page = Math.max(1, Number(params.page) || 1);
  const query = new URLSearchParams({ page: String(page), pageSize: String(PAGE_SIZE), ...(params.kind ? { kind: params.kind } : {}), ...(params.person ? { personId: params.person } : {}) });
  const result = useQuery({
    queryKey: ["audit", endpoint, query.toString()],
    queryFn: () => fetchJson<AuditPage>(`${endpoint}?${query}`),
    placeholderData: keepPreviousData,
  });
  const kinds = result.data?.kinds ?? [];
  const people = result.data?.people ?? [];
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="audit-kind" className="block text-xs font-medium text-ink-muted">
            Kind of event
          </label>
          <select id="audit-kind" value={params.kind ?? ""} onChange={(e) => set({ kind: e.target.value })} className={`${inputClass} w-56`}>
            <option value="">Every kind</option>
            {params.kind && !kinds.includes(params.kind) && <option value={params.kind}>{actionLabel(params.kind)}</option>}
            {kinds.map((k) => (
              <option key={k} value={k}>
                {actionLabel(k)}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="audit-person" className="block text-xs font-medium text-ink-muted">
            Person
          </label>
          <select id="audit-person" value={params.person ?? ""} onChange={(e) => set({ person: e.target.value })} className={`${inputClass} w-56`}>
            <option value="">Everybody</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </div>
        {(params.kind || params.person) && (
          <button type="button" className={quietButtonClass} onClick={() => set({ kind: null, person: null })}>
            Clear filters
          </button>
        )}
      </div>
      <DataTable
        label={label}
        columns={columns}
        rows={result.data?.rows}
        rowKey={(r) => String(r.id)}
        sortable={[]}
        sort="at"
        dir="desc"
        onSort={() => undefined}
        page={page}
        pageSize={PAGE_SIZE}
        total={result.data?.total ?? 0}
        onPage={(p) => set({ page: p }, true)}
        loading={result.isFetching}
        error={result.error}
        onRetry={() => void result.refetch()}
        empty={params.kind || params.person ? "No event matches these filters." : "Nothing has been recorded yet."}
      />
      <p className="text-xs text-ink-muted">Events are appended as things happen and are never changed or removed. Times are shown in your time zone; hover for UTC.</p>
    </div>
  );
}
