import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SheetWorkspace } from "@/components/review/sheet-workspace";
import { requireActor } from "@/lib/auth/session";
import { loadForPage } from "@/lib/page-load";
import { getSheetView } from "@/lib/review/sheet";

export const metadata: Metadata = { title: "Sheet" };
export const dynamic = "force-dynamic";

const verdictStyle = { pending: "bg-caution-soft text-caution", passed: "bg-ok-soft text-ok", failed: "bg-danger-soft text-danger" } as const;
const verdictText = { pending: "Awaiting sign-off", passed: "Signed: passed", failed: "Signed: failed" } as const;

export default async function SheetPage(props: { params: Promise<{ jobId: string; inspectionId: string }> }) {
  const params = await props.params;
  const actor = await requireActor();
  const view = await loadForPage(params.inspectionId, (id) => getSheetView(actor, id), { hideForbidden: true });
  if (String(view.job.id) !== params.jobId) notFound();
  return (
    <div className="space-y-4">
      <div>
        <Link href={`/jobs/${view.job.id}`} className="text-sm text-accent hover:underline">
          ← <span className="font-mono">{view.job.jobNumber}</span> {view.job.title}
        </Link>
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <h1 className="text-2xl font-semibold tracking-tight">Sheet {view.sheetNumber ?? "without number"}</h1>
          <span className={`rounded-md px-2 py-0.5 text-sm font-medium ${verdictStyle[view.verdict]}`}>{verdictText[view.verdict]}</span>
        </div>
        <p className="mt-1 text-sm text-ink-muted">
          {view.job.customerName} · artwork revision {view.artworkRevision} · {view.scanFileName}
          {view.alignment.rotationDeg !== null && ` · turned ${view.alignment.rotationDeg.toFixed(2)}°, fit ±${(view.alignment.residualMm ?? 0).toFixed(2)} mm`}
          {view.alignment.driftDeltaE00 !== null && ` · overall drift ΔE00 ${view.alignment.driftDeltaE00.toFixed(1)}`}
        </p>
        <p className="mt-1 flex flex-wrap gap-x-4 gap-y-1 text-sm">
          <a href={`/api/v1/inspections/${view.inspectionId}/report.pdf`} className="text-accent hover:underline">
            Sheet report (PDF)
          </a>
          <Link href={`/jobs/${view.job.id}/run`} className="text-accent underline">
            The press run
          </Link>
        </p>
      </div>
      <SheetWorkspace initial={view} />
    </div>
  );
}
