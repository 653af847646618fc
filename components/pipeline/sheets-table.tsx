"use client";
// The press run: one row per scanned sheet with the live stage of its inspection, its findings, and for a
// failure the reason in plain words with a Retry button (QA, admin).
import Link from "next/link";
import { Fragment, useState } from "react";
import type { JobPipelineView, SheetView } from "@/lib/pipeline/view";
import { FindingsList } from "./findings-list";
import { ProgressBar } from "./progress-bar";
import { errorMessageOf, postJson } from "./send-form";

const stageLabel: Record<string, string> = {
  queued: "Waiting in the queue",
  "waiting for artwork": "Waiting for the artwork to be prepared",
  load: "Reading the scan",
  align: "Aligning the scan to the artwork",
  normalise: "Matching the scan's colour to the artwork",
  compare: "Comparing",
  findings: "Marking differences",
  "store crops": "Saving close-ups",
  save: "Saving",
  "waiting to retry": "Interrupted; will try again shortly",
};

function Status({ sheet }: { sheet: SheetView }) {
  const i = sheet.inspection;
  if (!i) return <span className="text-ink-muted">Not inspected</span>;
  if (i.status === "done") return <span className="text-ok">Inspected</span>;
  if (i.status === "failed") return <span className="font-medium text-danger">Failed</span>;
  return (
    <div className="min-w-40 space-y-1">
      <div className="text-xs text-ink-muted">
        {stageLabel[i.stage ?? "queued"] ?? i.stage} · {i.percent}%
      </div>
      <ProgressBar fraction={i.percent / 100} label={`Inspection of sheet ${sheet.sheetNumber ?? "without number"}`} />
    </div>
  );
}

export function SheetsTable({ view, refresh }: { view: JobPipelineView; refresh: () => void }) {
  const [open, setOpen] = useState<number | null>(null);
  const [retryError, setRetryError] = useState<Record<number, string>>({});

  async function retry(inspectionId: number) {
    const res = await postJson(`/api/inspections/${inspectionId}/retry`);
    setRetryError((e) => ({ ...e, [inspectionId]: res.status === 200 ? "" : errorMessageOf(res.body) }));
    refresh();
  }

  return (
    <section aria-labelledby="sheets-heading" className="space-y-3 rounded-xl border border-rule bg-surface p-5 shadow-sm">
      <h2 id="sheets-heading" className="text-lg font-semibold">Press run</h2>
      {view.sheets.length === 0 ? (
        <p className="text-sm text-ink-muted">No sheets scanned yet.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead className="border-b border-rule text-xs uppercase tracking-wide text-ink-muted">
              <tr>
                <th scope="col" className="px-2 py-2 font-medium">Sheet</th>
                <th scope="col" className="px-2 py-2 font-medium">Scan</th>
                <th scope="col" className="px-2 py-2 font-medium">Inspection</th>
                <th scope="col" className="px-2 py-2 text-right font-medium">Findings</th>
                <th scope="col" className="px-2 py-2 font-medium"><span className="sr-only">Actions</span></th>
              </tr>
            </thead>
            <tbody className="divide-y divide-rule">
              {view.sheets.map((s) => {
                const i = s.inspection;
                return (
                  <Fragment key={s.scanId}>
                    <tr id={i ? `inspection-${i.id}` : undefined} className="align-top">
                      <td className="px-2 py-2 font-medium tabular-nums">{s.sheetNumber ?? "—"}</td>
                      <td className="max-w-56 truncate px-2 py-2 text-ink-muted" title={s.fileName}>
                        {s.fileName}
                        <div className="truncate text-xs" title={i?.profileLabel}>Revision {s.artworkRevision}{i ? ` · ${i.profileLabel}` : ""}</div>
                      </td>
                      <td className="px-2 py-2">
                        <Status sheet={s} />
                        {i?.status === "failed" && i.errorMessage && <p className="mt-1 max-w-prose text-danger">{i.errorMessage}</p>}
                        {i && retryError[i.id] && <p className="mt-1 text-danger">{retryError[i.id]}</p>}
                      </td>
                      <td className="px-2 py-2 text-right tabular-nums">{i?.status === "done" ? i.findingsCount : ""}</td>
                      <td className="whitespace-nowrap px-2 py-2 text-right">
                        {i?.status === "done" && (
                          <Link href={`/jobs/${view.job.id}/sheets/${i.id}`} className="mr-3 font-medium text-accent hover:underline">
                            Open sheet
                          </Link>
                        )}
                        {i?.status === "done" && (
                          <button type="button" onClick={() => setOpen(open === i.id ? null : i.id)} className="text-accent hover:underline" aria-expanded={open === i.id}>
                            {open === i.id ? "Hide findings" : "Show findings"}
                          </button>
                        )}
                        {i?.status === "failed" && view.may.retryInspection && (
                          <button type="button" onClick={() => void retry(i.id)} className="rounded-md border border-accent px-2.5 py-1 text-xs font-medium text-accent hover:bg-accent-soft">
                            Retry
                          </button>
                        )}
                      </td>
                    </tr>
                    {i && open === i.id && (
                      <tr>
                        <td colSpan={5} className="px-2 pb-4">
                          <FindingsList inspectionId={i.id} />
                        </td>
                      </tr>
                    )}
                  </Fragment>
                );
              })}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
