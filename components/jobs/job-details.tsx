"use client";
// The job's particulars and its status, with the allowed next statuses as buttons for those who may move it.
import { useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { fetchJson } from "@/components/tables/use-list-params";
import { quietButtonClass } from "@/components/ui/field";
import { LocalTime } from "@/components/ui/local-time";
import { Notice } from "@/components/ui/notice";
import type { JobDetail } from "@/lib/jobs/jobs";
import { STATUS_LABELS, type JobStatus } from "@/lib/jobs/schema";
import { JobStatusBadge } from "./status-badge";

const MOVE_LABELS: Record<JobStatus, string> = {
  prepress: "Back to prepress",
  on_press: "Put on press",
  completed: "Mark completed",
  cancelled: "Cancel job",
};

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-xs font-medium uppercase tracking-wide text-ink-muted">{label}</dt>
      <dd className="mt-0.5 text-sm">{children}</dd>
    </div>
  );
}

export function JobDetails({ jobId }: { jobId: number }) {
  const client = useQueryClient();
  const key = ["job", jobId];
  const result = useQuery({ queryKey: key, queryFn: () => fetchJson<JobDetail>(`/api/jobs/${jobId}`) });
  const [moving, setMoving] = useState<JobStatus | null>(null);
  const [notice, setNotice] = useState<{ tone: "ok" | "error"; text: string } | null>(null);

  async function move(status: JobStatus) {
    if (status === "cancelled" && !window.confirm("Cancel this job? A cancelled job cannot be reopened.")) return;
    setMoving(status);
    setNotice(null);
    const res = await fetch(`/api/jobs/${jobId}/status`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ status }) });
    const body = await res.json().catch(() => null);
    setMoving(null);
    if (res.ok) {
      client.setQueryData(key, body);
      setNotice({ tone: "ok", text: `The job is now ${STATUS_LABELS[status].toLowerCase()}.` });
    } else {
      setNotice({ tone: "error", text: body?.error?.message ?? "The status could not be changed. Please try again." });
    }
  }

  if (result.isPending) return <p role="status" className="text-sm text-ink-muted">Loading the job…</p>;
  if (result.error) return <Notice tone="error">{result.error.message}</Notice>;
  const job = result.data;
  return (
    <section aria-labelledby="job-facts-heading" className="space-y-4 rounded-xl border border-rule bg-surface p-5 shadow-sm">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 id="job-facts-heading" className="flex items-center gap-3 text-lg font-semibold">
          Job <JobStatusBadge status={job.status} />
        </h2>
        <div className="flex flex-wrap gap-2">
          {job.nextStatuses.map((status) => (
            <button key={status} type="button" className={quietButtonClass} disabled={moving !== null} onClick={() => void move(status)}>
              {moving === status ? "Saving…" : MOVE_LABELS[status]}
            </button>
          ))}
          {job.may.update && job.nextStatuses.length > 0 && (
            <Link href={`/jobs/${job.id}/edit`} className={quietButtonClass}>
              Edit job
            </Link>
          )}
          <Link href={`/jobs/${job.id}/audit`} className={quietButtonClass}>
            Audit trail
          </Link>
        </div>
      </div>
      {notice && <Notice tone={notice.tone}>{notice.text}</Notice>}
      <dl className="grid gap-4 sm:grid-cols-3 lg:grid-cols-4">
        <Fact label="Customer">{job.customerName}</Fact>
        <Fact label="Stock">{job.stock || "—"}</Fact>
        <Fact label="Board thickness">{job.boardThicknessMm === null ? "—" : `${job.boardThicknessMm.toLocaleString("en-GB", { maximumFractionDigits: 3 })} mm`}</Fact>
        <Fact label="Press">{job.press || "—"}</Fact>
        <Fact label="Run length">{job.runLengthSheets === null ? "Not known yet" : `${job.runLengthSheets.toLocaleString("en-GB")} sheets`}</Fact>
        <Fact label="Ups">
          {job.upsRows * job.upsColumns} ({job.upsRows} row{job.upsRows === 1 ? "" : "s"} × {job.upsColumns} column{job.upsColumns === 1 ? "" : "s"})
        </Fact>
        <Fact label="Tolerance profile">{job.toleranceProfileLabel ?? "The plant's default"}</Fact>
        <Fact label="Updated">
          <LocalTime at={job.updatedAt} withZone />
        </Fact>
      </dl>
    </section>
  );
}
