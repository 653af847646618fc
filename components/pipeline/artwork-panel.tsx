"use client";
// Artwork revisions of a job: upload a PDF (prepress) with a progress bar, draw a draft's excluded areas,
// approve a draft (which supersedes the revision approved before); the history says who did what, when.
import { useState } from "react";
import { Notice } from "@/components/ui/notice";
import type { JobPipelineView } from "@/lib/pipeline/view";
import { ProgressBar } from "./progress-bar";
import { errorMessageOf, postJson, sendForm } from "./send-form";
import { formatBytes } from "@/lib/format";
import { LocalTime } from "@/components/ui/local-time";
import { ExcludedAreasEditor } from "./excluded-areas-editor";
import { FontsNotEmbedded } from "./fonts-not-embedded";

const statusLabel = { draft: "Draft", approved: "Approved", superseded: "Superseded" } as const;
const rasterLabel = { none: "", pending: "Preparing for comparison…", ready: "Ready for comparison", failed: "Could not be prepared" } as const;

export function ArtworkPanel({ view, refresh }: { view: JobPipelineView; refresh: () => void }) {
  const [progress, setProgress] = useState<number | null>(null);
  const [notice, setNotice] = useState<{ tone: "ok" | "error" | "caution"; text: string } | null>(null);
  const [approving, setApproving] = useState<number | null>(null);

  async function upload(file: File) {
    const form = new FormData();
    form.append("file", file, file.name);
    setNotice(null);
    setProgress(0);
    const res = await sendForm(`/api/jobs/${view.job.id}/artworks`, form, setProgress);
    setProgress(null);
    if (res.status === 201 || res.status === 200) {
      const body = res.body as { duplicate: boolean; message: string };
      setNotice({ tone: body.duplicate ? "caution" : "ok", text: body.message });
      refresh();
    } else {
      setNotice({ tone: "error", text: errorMessageOf(res.body) });
    }
  }

  async function approve(id: number) {
    setApproving(id);
    const res = await postJson(`/api/artworks/${id}/approve`);
    setApproving(null);
    setNotice(res.status === 200 ? { tone: "ok", text: "Approved. The artwork is being prepared for comparison." } : { tone: "error", text: errorMessageOf(res.body) });
    refresh();
  }

  return (
    <section aria-labelledby="artwork-heading" className="space-y-3 rounded-xl border border-rule bg-surface p-5 shadow-sm">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h2 id="artwork-heading" className="text-lg font-semibold">Artwork</h2>
        {view.may.uploadArtwork && (
          <label className="cursor-pointer rounded-md bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong">
            Upload artwork PDF
            <input
              type="file"
              accept="application/pdf,.pdf"
              className="sr-only"
              disabled={progress !== null}
              onChange={(e) => {
                const file = e.target.files?.[0];
                e.target.value = "";
                if (file) void upload(file);
              }}
            />
          </label>
        )}
      </div>
      {progress !== null && <ProgressBar fraction={progress} label="Artwork upload" />}
      {notice && <Notice tone={notice.tone}>{notice.text}</Notice>}
      {view.revisions.length === 0 ? (
        <p className="text-sm text-ink-muted">No artwork yet. Prepress uploads the approved artwork PDF of this job here; a new upload later becomes the next revision.</p>
      ) : (
        <ul className="divide-y divide-rule text-sm">
          {view.revisions.map((r, index) => (
            <li key={r.id} className="space-y-1 py-3">
              <div className="flex flex-wrap items-center gap-x-4 gap-y-1">
                <span className="font-medium">Revision {r.revision}</span>
                {/* Only the file name gives way on a narrow screen: the page size is what prepress checks. */}
                <span className="flex min-w-0 flex-1 text-ink-muted">
                  <span className="truncate" title={r.fileName}>
                    {r.fileName}
                  </span>
                  <span className="shrink-0 whitespace-pre">
                    {` · ${formatBytes(r.bytes)}`}
                    {r.pageWidthMm && r.pageHeightMm ? ` · ${r.pageWidthMm} × ${r.pageHeightMm} mm` : ""}
                  </span>
                </span>
                <span className={r.status === "approved" ? "font-medium text-ok" : "text-ink-muted"}>{statusLabel[r.status]}</span>
                {r.status === "approved" && <span className={r.rasterStatus === "failed" ? "text-danger" : "text-ink-muted"}>{rasterLabel[r.rasterStatus]}</span>}
                {r.status === "draft" && view.may.approveArtwork && (
                  <button
                    type="button"
                    onClick={() => void approve(r.id)}
                    disabled={approving !== null}
                    className="rounded-md border border-accent px-2.5 py-1 text-xs font-medium text-accent hover:bg-accent-soft disabled:opacity-50"
                  >
                    {approving === r.id ? "Approving…" : r.excludedAreas.length ? `Approve with ${r.excludedAreas.length} excluded area${r.excludedAreas.length === 1 ? "" : "s"}` : "Approve"}
                  </button>
                )}
              </div>
              <p className="text-xs text-ink-muted">
                Uploaded <LocalTime at={r.uploadedAt} />
                {r.uploadedByName ? ` by ${r.uploadedByName}` : ""}
                {r.approvedAt && (
                  <>
                    {" · approved "}
                    <LocalTime at={r.approvedAt} />
                    {r.approvedByName ? ` by ${r.approvedByName}` : ""}
                  </>
                )}
                {r.supersededAt && (
                  <>
                    {" · superseded "}
                    <LocalTime at={r.supersededAt} />
                  </>
                )}
              </p>
              {r.rasterError && <p className="w-full text-danger">{r.rasterError}</p>}
              <FontsNotEmbedded revision={r} mayUpload={view.may.uploadArtwork} />
              <details className="group" open={index === 0}>
                <summary className="cursor-pointer text-xs font-medium text-accent hover:underline">
                  Page and excluded areas ({r.excludedAreas.length})
                </summary>
                <div className="mt-3">
                  <ExcludedAreasEditor revision={r} editable={r.status === "draft" && view.may.uploadArtwork} refresh={refresh} />
                </div>
              </details>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
