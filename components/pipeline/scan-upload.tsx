"use client";
// Scan upload for QA: several files at once, a sheet number each (read from the file name, editable), one
// request per file so every file has its own progress bar and its own answer.
import { useState } from "react";
import { sheetNumberFromName } from "@/lib/uploads/sheet-number";
import type { JobPipelineView } from "@/lib/pipeline/view";
import { ProgressBar } from "./progress-bar";
import { errorMessageOf, sendForm } from "./send-form";
import { formatBytes } from "@/lib/format";

interface Pending {
  key: string;
  file: File;
  sheetNumber: string;
  progress: number | null;
  outcome: { tone: "ok" | "error" | "caution"; text: string } | null;
}

const toneClass = { ok: "text-ok", error: "text-danger", caution: "text-caution" } as const;

export function ScanUpload({ view, refresh }: { view: JobPipelineView; refresh: () => void }) {
  const [files, setFiles] = useState<Pending[]>([]);
  const [profile, setProfile] = useState(view.job.toleranceProfileName ?? view.profiles[0]?.name ?? "");
  const [busy, setBusy] = useState(false);
  const approved = view.revisions.find((r) => r.status === "approved");
  const update = (key: string, patch: Partial<Pending>) => setFiles((all) => all.map((p) => (p.key === key ? { ...p, ...patch } : p)));

  function choose(list: FileList | null) {
    const chosen = Array.from(list ?? []).map((file, i) => ({
      key: `${Date.now()}-${i}-${file.name}`,
      file,
      sheetNumber: String(sheetNumberFromName(file.name) ?? ""),
      progress: null,
      outcome: null,
    }));
    setFiles((all) => [...all.filter((p) => !p.outcome || p.outcome.tone === "error"), ...chosen]);
  }

  async function uploadAll() {
    setBusy(true);
    for (const p of files.filter((f) => !f.outcome || f.outcome.tone === "error")) {
      const form = new FormData();
      form.append("sheetNumber", p.sheetNumber);
      form.append("profile", profile);
      form.append("file", p.file, p.file.name);
      update(p.key, { progress: 0, outcome: null });
      const res = await sendForm(`/api/jobs/${view.job.id}/scans`, form, (f) => update(p.key, { progress: f }));
      const item = (res.body as { items?: { duplicate: boolean; message: string }[] })?.items?.[0];
      update(p.key, {
        progress: null,
        outcome: item ? { tone: item.duplicate ? "caution" : "ok", text: item.message } : { tone: "error", text: errorMessageOf(res.body) },
      });
      refresh();
    }
    setBusy(false);
  }

  if (!view.may.uploadScans) return null;
  return (
    <section aria-labelledby="scan-heading" className="space-y-3 rounded-xl border border-rule bg-surface p-5 shadow-sm">
      <h2 id="scan-heading" className="text-lg font-semibold">Upload sheet scans</h2>
      {!approved ? (
        <p className="text-sm text-ink-muted">Scans can be uploaded once prepress has approved an artwork revision.</p>
      ) : (
        <>
          <p className="text-sm text-ink-muted">
            TIFF, PNG or JPEG. Each scan is compared with revision {approved.revision}. The sheet number is read from a file name such as
            “sheet-0217.tif”; correct it if needed.
          </p>
          <div className="flex flex-wrap items-end gap-3">
            <label className="cursor-pointer rounded-md border border-accent px-3 py-1.5 text-sm font-medium text-accent hover:bg-accent-soft">
              Choose scans…
              <input type="file" multiple accept="image/tiff,image/png,image/jpeg,.tif,.tiff,.png,.jpg,.jpeg" className="sr-only" onChange={(e) => (choose(e.target.files), (e.target.value = ""))} />
            </label>
            <label className="text-sm">
              <span className="mr-2 text-ink-muted">Tolerances</span>
              <select value={profile} onChange={(e) => setProfile(e.target.value)} className="rounded-md border border-rule bg-surface px-2 py-1">
                {view.profiles.map((p) => (
                  <option key={p.name} value={p.name}>
                    {p.label}
                  </option>
                ))}
              </select>
            </label>
            <button
              type="button"
              disabled={busy || !files.some((f) => !f.outcome || f.outcome.tone === "error")}
              onClick={() => void uploadAll()}
              className="rounded-md bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong disabled:opacity-50"
            >
              {busy ? "Uploading…" : "Upload"}
            </button>
          </div>
          {files.length > 0 && (
            <ul className="divide-y divide-rule text-sm">
              {files.map((p) => (
                <li key={p.key} className="grid grid-cols-[1fr_auto] items-center gap-x-4 gap-y-1 py-2 sm:grid-cols-[minmax(0,2fr)_8rem_minmax(0,3fr)]">
                  <span className="truncate" title={p.file.name}>
                    {p.file.name} <span className="text-ink-muted">· {formatBytes(p.file.size)}</span>
                  </span>
                  <label className="flex items-center gap-1">
                    <span className="text-ink-muted">Sheet</span>
                    <input
                      inputMode="numeric"
                      value={p.sheetNumber}
                      disabled={p.progress !== null || p.outcome?.tone === "ok"}
                      onChange={(e) => update(p.key, { sheetNumber: e.target.value })}
                      aria-label={`Sheet number of ${p.file.name}`}
                      className="w-20 rounded-md border border-rule px-2 py-0.5 tabular-nums"
                    />
                  </label>
                  <div className="col-span-2 sm:col-span-1">
                    {p.progress !== null ? <ProgressBar fraction={p.progress} label={`Upload of ${p.file.name}`} /> : p.outcome ? <span className={toneClass[p.outcome.tone]}>{p.outcome.text}</span> : <span className="text-ink-muted">Waiting</span>}
                  </div>
                </li>
              ))}
            </ul>
          )}
        </>
      )}
    </section>
  );
}
