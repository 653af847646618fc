// The traceability table of a press run: one row per pulled sheet in sheet-number order.
import Link from "next/link";
import { LocalTime } from "@/components/ui/local-time";
import type { RunSheet } from "@/lib/run/traceability";

const verdictStyle = { pending: "text-caution", passed: "text-ok", failed: "font-semibold text-danger" } as const;
const verdictWord = { pending: "Not signed", passed: "Passed", failed: "Failed" } as const;
const statusWord = { queued: "Queued", running: "Being inspected", done: "Inspected", failed: "Inspection failed" } as const;

export function RunTable({ jobId, sheets }: { jobId: number; sheets: RunSheet[] }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" aria-label="Sheets of the press run in sheet-number order">
        <thead className="border-b border-rule text-xs uppercase tracking-wide text-ink-muted">
          <tr>
            <th scope="col" className="px-2 py-2 font-medium">Sheet</th>
            <th scope="col" className="px-2 py-2 font-medium">Inspection</th>
            <th scope="col" className="px-2 py-2 text-right font-medium">Findings</th>
            <th scope="col" className="px-2 py-2 font-medium">Verdict</th>
            <th scope="col" className="px-2 py-2 font-medium">Signed</th>
            <th scope="col" className="px-2 py-2 font-medium">Span to pull</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-rule">
          {sheets.map((s) => (
            <tr key={s.scanId} data-sheet={s.sheetNumber ?? ""} className={s.verdict === "failed" ? "bg-danger-soft/50" : undefined}>
              <td className="px-2 py-2 align-top">
                {s.inspectionId ? (
                  <Link href={`/jobs/${jobId}/sheets/${s.inspectionId}`} className="font-semibold tabular-nums text-accent hover:underline">
                    {s.sheetNumber ?? "No number"}
                  </Link>
                ) : (
                  <span className="font-semibold tabular-nums">{s.sheetNumber ?? "No number"}</span>
                )}
                <div className="max-w-48 truncate text-xs text-ink-muted" title={`${s.scanFileName} · sha256 ${s.scanSha256}`}>
                  {s.scanFileName}
                </div>
              </td>
              <td className="px-2 py-2 align-top">
                {s.status ? statusWord[s.status] : "Not inspected"}
                {s.inspectedAt && (
                  <div className="text-xs text-ink-muted">
                    <LocalTime at={s.inspectedAt} />
                  </div>
                )}
              </td>
              <td className="px-2 py-2 text-right align-top tabular-nums">
                {s.status === "done" ? s.findings : "—"}
                {s.rejectedFindings > 0 && <div className="text-xs text-danger">{s.rejectedFindings} rejected</div>}
                {s.repeatingFindings > 0 && <div className="text-xs text-caution">{s.repeatingFindings} repeating</div>}
                {s.everyUpFindings > 0 && <div className="text-xs text-caution">{s.everyUpFindings} in every up</div>}
              </td>
              <td className={`px-2 py-2 align-top ${verdictStyle[s.verdict]}`}>{verdictWord[s.verdict]}</td>
              <td className="px-2 py-2 align-top">
                {s.signedBy && s.signedAt ? (
                  <>
                    {s.signedBy}
                    <div className="text-xs text-ink-muted">
                      <LocalTime at={s.signedAt} />
                    </div>
                  </>
                ) : (
                  <span className="text-ink-muted">—</span>
                )}
              </td>
              <td className="px-2 py-2 align-top">{s.spanToPull ? <span className="font-medium text-danger">{s.spanToPull}</span> : <span className="text-ink-muted">—</span>}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
