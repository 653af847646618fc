import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { RunChart, type ChartSheet } from "@/components/run/run-chart";
import { RunTable } from "@/components/run/run-table";
import { requireActor } from "@/lib/auth/session";
import { AppError } from "@/lib/errors";
import { getJob } from "@/lib/jobs/jobs";
import { getRunView, type RunView } from "@/lib/run/traceability";

export const metadata: Metadata = { title: "Press run" };
export const dynamic = "force-dynamic";

export default async function RunPage(props: { params: Promise<{ jobId: string }>; searchParams: Promise<{ revision?: string }> }) {
  const params = await props.params;
  const search = await props.searchParams;
  const actor = await requireActor();
  const jobId = Number(params.jobId);
  if (!Number.isSafeInteger(jobId) || jobId <= 0) notFound();
  const revision = search.revision && /^\d{1,5}$/.test(search.revision) ? Number(search.revision) : undefined;
  let run: RunView;
  try {
    run = await getRunView(actor, jobId, revision);
  } catch (error) {
    if (!(error instanceof AppError && (error.status === 404 || error.status === 403))) throw error;
    // A job the reader may see but with no approved artwork yet has no press run: say so rather than 404.
    const job = await getJob(actor, jobId).catch(() => null);
    if (!job || revision !== undefined) notFound();
    return <NoRunYet jobId={job.id} jobNumber={job.jobNumber} title={job.title} />;
  }
  const query = `?revision=${run.revision.revision}`;
  const chart: ChartSheet[] = run.sheets.flatMap((s) =>
    s.sheetNumber !== null && s.inspectionId !== null && s.status === "done"
      ? [{ sheetNumber: s.sheetNumber, inspectionId: s.inspectionId, drift: s.driftDeltaE00, findings: s.findings, verdict: s.verdict, repeating: s.repeatingFindings, everyUp: s.everyUpFindings }]
      : [],
  );
  const failed = run.sheets.filter((s) => s.verdict === "failed").length;
  return (
    <div className="space-y-6">
      <div>
        <Link href={`/jobs/${run.job.id}`} className="text-sm text-accent hover:underline">
          ← <span className="font-mono">{run.job.jobNumber}</span> {run.job.title}
        </Link>
        <h1 className="mt-2 text-2xl font-semibold tracking-tight">Press run, artwork revision {run.revision.revision}</h1>
        <p className="mt-1 break-all text-sm text-ink-muted">
          {run.job.customerName} · {run.revision.fileName || "artwork"} · sha256 <span className="font-mono text-xs">{run.revision.sha256}</span>
        </p>
        {run.runs.length > 1 && (
          <nav aria-label="Other runs of this job" className="mt-2 flex flex-wrap gap-2 text-sm">
            {run.runs.map((r) => (
              <Link
                key={r.revisionId}
                href={`/jobs/${run.job.id}/run?revision=${r.revision}`}
                aria-current={r.revisionId === run.revision.id ? "page" : undefined}
                className={`rounded-md border px-2 py-0.5 ${r.revisionId === run.revision.id ? "border-accent bg-accent-soft" : "border-rule hover:bg-surface"}`}
              >
                Revision {r.revision} · {r.sheets} sheet{r.sheets === 1 ? "" : "s"}
              </Link>
            ))}
          </nav>
        )}
      </div>

      <div className="grid gap-4 md:grid-cols-3">
        <section aria-labelledby="sampling-heading" className="rounded-xl border border-rule bg-surface p-4 shadow-sm">
          <h2 id="sampling-heading" className="text-sm font-medium text-ink-muted">Sampled</h2>
          <p className="mt-1 text-lg font-semibold" data-testid="sampling">{run.sampling}</p>
          <p className="mt-1 text-sm text-ink-muted">
            {run.sheets.length} pulled · {failed} failed{run.profile ? ` · ${run.profile.label}` : ""}
          </p>
        </section>
        <section
          aria-labelledby="spans-heading"
          className={`rounded-xl border p-4 shadow-sm md:col-span-2 ${run.spans.length ? "border-danger/40 bg-danger-soft" : "border-rule bg-surface"}`}
        >
          <h2 id="spans-heading" className={`text-sm font-medium ${run.spans.length ? "text-danger" : "text-ink-muted"}`}>Spans to pull from the delivery</h2>
          {run.spans.length === 0 ? (
            <p className="mt-1 text-sm">No sheet has been signed failed in this run.</p>
          ) : (
            <ul className="mt-1 space-y-1" data-testid="spans">
              {run.spans.map((span) => (
                <li key={`${span.from}-${span.to}`} className="text-base">
                  <span className="font-semibold">Pull {span.text}</span>
                  {span.sheets !== null && <span className="tabular-nums"> ({span.sheets} sheet{span.sheets === 1 ? "" : "s"})</span>}
                  <span className="text-sm"> · failed: sheet{span.failedSheets.length === 1 ? "" : "s"} {span.failedSheets.join(", ")}</span>
                </li>
              ))}
            </ul>
          )}
          <p className="mt-2 text-xs text-ink-muted">
            A span runs from the sheet after the last passed sheet before a failed one to the sheet before the next passed sheet after it.
          </p>
        </section>
      </div>

      <div className="flex flex-wrap gap-2">
        <a href={`/api/v1/jobs/${run.job.id}/run/sheets.csv${query}`} className="rounded-md border border-rule bg-surface px-3 py-1.5 text-sm font-medium hover:bg-paper" download>
          Download sheets (CSV)
        </a>
        <a href={`/api/v1/jobs/${run.job.id}/run/report.pdf${query}`} className="rounded-md bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong">
          Run report (PDF)
        </a>
      </div>

      <section aria-labelledby="chart-heading" className="space-y-2 rounded-xl border border-rule bg-surface p-4 shadow-sm">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="chart-heading" className="text-lg font-semibold">Run chart</h2>
          <p className="text-xs text-ink-muted">
            Line: overall drift ΔE00 · bars: findings · dashed: the profile&apos;s ΔE00 limit · ring: repeating or in-every-up findings · click a point to open the sheet
          </p>
        </div>
        {chart.length === 0 ? <p className="text-sm text-ink-muted">No sheet of this run has been inspected yet.</p> : <RunChart jobId={run.job.id} sheets={chart} limit={run.profile?.deltaE00Threshold ?? null} />}
      </section>

      <section aria-labelledby="table-heading" className="space-y-2 rounded-xl border border-rule bg-surface p-4 shadow-sm">
        <h2 id="table-heading" className="text-lg font-semibold">Sheets by sheet number</h2>
        {run.sheets.length === 0 ? <p className="text-sm text-ink-muted">No sheets of this run have been scanned yet.</p> : <RunTable jobId={run.job.id} sheets={run.sheets} />}
      </section>
    </div>
  );
}

function NoRunYet({ jobId, jobNumber, title }: { jobId: number; jobNumber: string; title: string }) {
  return (
    <div className="space-y-4">
      <Link href={`/jobs/${jobId}`} className="text-sm text-accent underline">
        ← <span className="font-mono">{jobNumber}</span> {title}
      </Link>
      <h1 className="text-2xl font-semibold tracking-tight">Press run</h1>
      <p className="rounded-lg border border-rule bg-white p-5 text-sm text-ink-muted">
        No press run yet. A run starts when an artwork revision of this job is approved; its scanned sheets, their
        verdicts, the spans to pull and the reports then appear here.
      </p>
    </div>
  );
}
