"use client";
// One finding beside the viewer: its close-ups, figures and decision, with accept / reject / undo. Every request
// names the finding's version as shown; a stale one comes back 409 and the message names who decided first.
import { useEffect, useRef, useState } from "react";
import type { SheetFinding } from "@/lib/review/sheet";
import { formatLocal, LocalTime } from "./local-time";
import { DECISION_LABELS, KIND_LABELS, REASON_LABELS } from "./labels";
import { PriorSuggestion, RecurrenceNote } from "./run-memory";

export const isTyping = (target: EventTarget | null) => {
  const el = target as HTMLElement | null;
  return !!el && (["INPUT", "TEXTAREA", "SELECT"].includes(el.tagName) || el.isContentEditable);
};

interface Props {
  inspectionId: number;
  jobId: number;
  finding: SheetFinding;
  mayDecide: boolean;
  onDecided: (advance: boolean) => void;
}

const fmt = (n: number, d = 1) => n.toFixed(d);

/** Shown with key={finding.id}, so its form starts afresh for each finding. */
export function FindingDetail({ inspectionId, jobId, finding: f, mayDecide, onDecided }: Props) {
  const [reason, setReason] = useState<"no_defect" | "within_tolerance">(f.reason === "within_tolerance" ? "within_tolerance" : "no_defect");
  const [comment, setComment] = useState(f.comment ?? "");
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ tone: "error" | "conflict"; text: string } | null>(null);
  const commentRef = useRef<HTMLTextAreaElement>(null);
  const url = `/api/inspections/${inspectionId}/findings/${f.id}/decision`;

  async function send(method: "POST" | "DELETE", body: object) {
    setBusy(true);
    setMessage(null);
    try {
      const res = await fetch(url, { method, headers: { "Content-Type": "application/json" }, body: JSON.stringify({ ...body, version: f.version }) });
      const data = await res.json().catch(() => null);
      if (res.ok) return onDecided(method === "POST");
      if (res.status === 409 && data?.conflict) {
        const { decidedBy, decidedAt } = data.conflict as { decidedBy: string | null; decidedAt: string | null };
        setMessage({
          tone: "conflict",
          text: `${decidedBy ?? "Someone"} changed this finding first${decidedAt ? `, at ${formatLocal(decidedAt)}` : ""}. Nothing of yours was saved; the finding now shows their decision.`,
        });
        return onDecided(false);
      }
      setMessage({ tone: "error", text: data?.error?.message ?? "The decision could not be saved. Please try again." });
    } catch {
      setMessage({ tone: "error", text: "The connection broke; nothing was saved. Please try again." });
    } finally {
      setBusy(false);
    }
  }

  const accept = () => void send("POST", { decision: "accepted", reason });
  // Run memory's suggestion, confirmed by the reviewer: the earlier sheet's reason, with a note of where it came from.
  const confirmPrior = () =>
    f.prior &&
    void send("POST", {
      decision: "accepted",
      reason: f.prior.reason === "within_tolerance" ? "within_tolerance" : "no_defect",
      comment: comment.trim() || `As accepted on sheet ${f.prior.sheetNumber ?? "without number"}.`,
      confirmsPrior: true,
    });
  const reject = () => {
    if (!comment.trim()) {
      setMessage({ tone: "error", text: "Say in the comment what is wrong before you reject the finding." });
      commentRef.current?.focus();
      return;
    }
    void send("POST", { decision: "rejected", reason: "defect", comment });
  };

  // Keys A and R decide the finding shown (not while typing in a field; N and P are the page's).
  useEffect(() => {
    if (!mayDecide || f.decision !== "pending" || busy) return;
    const onKey = (e: KeyboardEvent) => {
      if (e.ctrlKey || e.metaKey || e.altKey || isTyping(e.target)) return;
      const k = e.key.toLowerCase();
      if (k !== "a" && k !== "r") return;
      e.preventDefault();
      if (k === "a") accept();
      else reject();
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  });

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="text-base font-semibold">
          Finding {f.number}: {KIND_LABELS[f.kind]}
        </h3>
        <span className={`rounded px-2 py-0.5 text-xs font-medium ${f.decision === "accepted" ? "bg-ok-soft text-ok" : f.decision === "rejected" ? "bg-danger-soft text-danger" : "bg-caution-soft text-caution"}`}>
          {DECISION_LABELS[f.decision]}
        </span>
      </div>
      <RecurrenceNote recurrence={f.recurrence} />
      <PriorSuggestion finding={f} jobId={jobId} mayDecide={mayDecide} busy={busy} onConfirm={confirmPrior} />
      {f.crops ? (
        <div className="grid grid-cols-3 gap-1">
          {(["artwork", "scan", "difference"] as const).map((k) => (
            <figure key={k}>
              {/* eslint-disable-next-line @next/next/no-img-element -- crops are streamed through a policy-checked route */}
              <img src={f.crops![k]} alt={`${k} close-up of finding ${f.number}`} className="aspect-square w-full rounded border border-rule bg-white object-contain" />
              <figcaption className="mt-0.5 text-center text-xs capitalize text-ink-muted">{k}</figcaption>
            </figure>
          ))}
        </div>
      ) : (
        <p className="text-sm text-ink-muted">No close-up was kept for this finding; use the viewer.</p>
      )}
      <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-sm">
        <dt className="text-ink-muted">Size</dt>
        <dd className="tabular-nums">{fmt(f.wMm)} × {fmt(f.hMm)} mm ({fmt(f.areaMm2, 2)} mm²)</dd>
        <dt className="text-ink-muted">ΔE00 mean / max</dt>
        <dd className="tabular-nums">{fmt(f.deltaE00Mean)} / {fmt(f.deltaE00Max)}</dd>
        <dt className="text-ink-muted">Up</dt>
        <dd>{f.up ?? "Outside the ups"}</dd>
        <dt className="text-ink-muted">Position</dt>
        <dd className="tabular-nums">x {fmt(f.xMm)} mm, y {fmt(f.yMm)} mm from the trim box&apos;s top left</dd>
      </dl>
      {f.decision !== "pending" && f.decidedBy && f.decidedAt && (
        <p className="text-sm">
          {DECISION_LABELS[f.decision]} by {f.decidedBy}, <LocalTime iso={f.decidedAt} />
          {f.reason ? ` · ${REASON_LABELS[f.reason]}` : ""}
          {f.comment ? <span className="mt-1 block rounded bg-paper px-2 py-1 text-ink">“{f.comment}”</span> : null}
        </p>
      )}
      {message && (
        <p role="alert" className={`rounded-md border px-3 py-2 text-sm ${message.tone === "conflict" ? "border-caution/40 bg-caution-soft text-caution" : "border-danger/30 bg-danger-soft text-danger"}`}>
          {message.text}
        </p>
      )}
      {mayDecide && f.decision === "pending" && (
        <div className="space-y-3 rounded-lg border border-rule bg-paper/50 p-3">
          <fieldset className="space-y-1">
            <legend className="text-sm font-medium">Accept because</legend>
            {(["no_defect", "within_tolerance"] as const).map((r) => (
              <label key={r} className="mr-4 inline-flex items-center gap-1.5 text-sm">
                <input type="radio" name={`reason-${f.id}`} value={r} checked={reason === r} onChange={() => setReason(r)} className="accent-accent" />
                {REASON_LABELS[r]}
              </label>
            ))}
          </fieldset>
          <div className="space-y-1">
            <label htmlFor={`comment-${f.id}`} className="block text-sm font-medium">
              Comment <span className="font-normal text-ink-muted">(required to reject)</span>
            </label>
            <textarea id={`comment-${f.id}`} ref={commentRef} value={comment} onChange={(e) => setComment(e.target.value)} rows={2} maxLength={2000} className="block w-full rounded-md border border-rule bg-surface px-2 py-1.5 text-sm" />
          </div>
          <div className="flex flex-wrap gap-2">
            <button type="button" disabled={busy} onClick={accept} className="rounded-md bg-ok px-3 py-1.5 text-sm font-medium text-white hover:brightness-110 disabled:opacity-60">
              Accept <kbd className="ml-1 rounded bg-white/20 px-1 text-xs">A</kbd>
            </button>
            <button type="button" disabled={busy} onClick={reject} className="rounded-md bg-danger px-3 py-1.5 text-sm font-medium text-white hover:brightness-110 disabled:opacity-60">
              Reject as defect <kbd className="ml-1 rounded bg-white/20 px-1 text-xs">R</kbd>
            </button>
          </div>
        </div>
      )}
      {mayDecide && f.decision !== "pending" && (
        <button type="button" disabled={busy} onClick={() => void send("DELETE", {})} className="rounded-md border border-rule bg-surface px-3 py-1.5 text-sm font-medium hover:bg-paper disabled:opacity-60">
          Undo decision
        </button>
      )}
    </div>
  );
}
