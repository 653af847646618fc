"use client";
// Run memory on the sheet page: a finding's standing in the press run (repeating, in every up) and, for a pending
// finding at the place of one accepted on an earlier sheet, the suggestion to decide it the same way. The reviewer
// confirms with one key (C) or the button; nothing is decided without them.
import { useEffect } from "react";
import type { SheetFinding } from "@/lib/review/sheet";
import { REASON_LABELS } from "./labels";

export const RECURRENCE_LABELS = { repeating: "Repeating", every_up: "In every up" } as const;
const RECURRENCE_HINTS = {
  repeating: "At the same place on three or more consecutive inspected sheets: look at the plate, blanket or artwork.",
  every_up: "At the same place in every up of this sheet: look at the artwork or the plate.",
} as const;

export function RecurrenceBadge({ recurrence }: { recurrence: SheetFinding["recurrence"] }) {
  if (recurrence !== "repeating" && recurrence !== "every_up") return null;
  return (
    <span title={RECURRENCE_HINTS[recurrence]} className="rounded bg-caution-soft px-1.5 py-0.5 text-xs font-medium text-caution">
      {RECURRENCE_LABELS[recurrence]}
    </span>
  );
}

export function RecurrenceNote({ recurrence }: { recurrence: SheetFinding["recurrence"] }) {
  if (recurrence !== "repeating" && recurrence !== "every_up") return null;
  return (
    <p className="rounded-md border border-caution/40 bg-caution-soft px-3 py-2 text-sm text-caution">
      <strong>{RECURRENCE_LABELS[recurrence]}.</strong> {RECURRENCE_HINTS[recurrence]}
    </p>
  );
}

interface PriorProps {
  finding: SheetFinding;
  jobId: number;
  mayDecide: boolean;
  busy: boolean;
  onConfirm: () => void;
}

/** "Accepted on sheet N": shown for a pending finding with a prior; C (or the button) confirms. */
export function PriorSuggestion({ finding: f, jobId, mayDecide, busy, onConfirm }: PriorProps) {
  const prior = f.prior;
  const active = !!prior && f.decision === "pending" && mayDecide && !busy;
  useEffect(() => {
    if (!active) return;
    const onKey = (e: KeyboardEvent) => {
      const el = e.target as HTMLElement | null;
      if (e.ctrlKey || e.metaKey || e.altKey || (el && (["INPUT", "TEXTAREA", "SELECT"].includes(el.tagName) || el.isContentEditable))) return;
      if (e.key.toLowerCase() !== "c") return;
      e.preventDefault();
      onConfirm();
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [active, onConfirm]);
  if (!prior) return null;
  const sheet = prior.sheetNumber ?? "without number";
  if (f.decision !== "pending") {
    return <p className="text-xs text-ink-muted">Run memory suggested the decision of sheet {sheet}.</p>;
  }
  return (
    <div className="space-y-2 rounded-md border border-accent/40 bg-accent-soft px-3 py-2 text-sm" data-testid="prior-suggestion">
      <p>
        <strong>Accepted on sheet {sheet}</strong>
        {prior.reason ? ` as “${REASON_LABELS[prior.reason]}”` : ""}
        {prior.decidedBy ? ` by ${prior.decidedBy}` : ""}: the same kind of finding at the same place of the same up.{" "}
        <a href={`/jobs/${jobId}/sheets/${prior.inspectionId}`} className="text-accent underline">
          Open sheet {sheet}
        </a>
      </p>
      {prior.comment && <p className="rounded bg-surface px-2 py-1">“{prior.comment}”</p>}
      {mayDecide && (
        <button type="button" disabled={busy} onClick={onConfirm} className="rounded-md bg-accent px-3 py-1.5 text-sm font-medium text-white hover:bg-accent-strong disabled:opacity-60">
          Confirm: accept as on sheet {sheet} <kbd className="ml-1 rounded bg-white/20 px-1 text-xs">C</kbd>
        </button>
      )}
    </div>
  );
}
