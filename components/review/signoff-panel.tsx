"use client";
// Signing the sheet: shown once every finding is decided. The reviewer chooses passed or failed and what the
// signature means, and re-enters the password. Signatures are listed with their record fingerprint and whether
// the record still matches it; an administrator may reopen a signed sheet, giving a reason.
import { useState } from "react";
import type { SheetView } from "@/lib/review/sheet";
import { LocalTime } from "./local-time";
import { MEANING_LABELS } from "./labels";

const MEANINGS_FOR = { passed: ["reviewed", "approved_for_release"], failed: ["reviewed", "rejected"] } as const;
type Meaning = keyof typeof MEANING_LABELS;

export function SignoffPanel({ sheet, onChanged }: { sheet: SheetView; onChanged: () => void }) {
  const pending = sheet.findings.filter((f) => f.decision === "pending").length;
  const rejected = sheet.findings.filter((f) => f.decision === "rejected").length;
  const [verdict, setVerdict] = useState<"passed" | "failed">(rejected > 0 ? "failed" : "passed");
  const [meaning, setMeaning] = useState<Meaning>("reviewed");
  const [password, setPassword] = useState("");
  const [reason, setReason] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const effectiveVerdict = rejected > 0 ? "failed" : verdict;

  async function post(path: string, body: object) {
    setBusy(true);
    setError(null);
    try {
      const res = await fetch(`/api/inspections/${sheet.inspectionId}/${path}`, { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
      const data = await res.json().catch(() => null);
      if (!res.ok) return setError(data?.error?.message ?? "That did not work. Please try again.");
      setPassword("");
      setReason("");
      onChanged();
    } catch {
      setError("The connection broke; nothing was saved. Please try again.");
    } finally {
      setBusy(false);
    }
  }

  const active = sheet.signatures.find((s) => !s.reopenedAt);
  return (
    <section aria-labelledby="signoff-heading" className="space-y-3 rounded-xl border border-rule bg-surface p-4 shadow-sm">
      <h2 id="signoff-heading" className="text-lg font-semibold">Sign-off</h2>
      <p className="rounded-md border border-caution/30 bg-caution-soft px-3 py-2 text-sm text-caution">
        Tympan shows differences; it does not release product. Sign-off stays with qualified staff under the customer&apos;s and the regulator&apos;s rules. Colour figures from a scan are indicative only; a spectrophotometer decides on colour.
      </p>
      {active && (
        <div className={`rounded-lg border p-3 text-sm ${active.verdict === "passed" ? "border-ok/40 bg-ok-soft" : "border-danger/40 bg-danger-soft"}`}>
          <p className={`text-base font-semibold ${active.verdict === "passed" ? "text-ok" : "text-danger"}`}>Sheet signed {active.verdict}</p>
          <p className="text-ink">
            {active.signerName} ({active.signerRole}) · {MEANING_LABELS[active.meaning]} · <LocalTime iso={active.signedAt} />
          </p>
          <p className="mt-1 break-all font-mono text-xs text-ink-muted">sha256 {active.recordSha256}</p>
          {active.intact ? (
            <p className="mt-1 text-ok">The record still matches what was signed.</p>
          ) : (
            <p role="alert" className="mt-1 font-semibold text-danger">The record has changed since it was signed: this signature no longer covers it. Tell an administrator.</p>
          )}
        </div>
      )}
      {sheet.verdict === "pending" && sheet.may.signoff && pending > 0 && (
        <p className="text-sm text-ink-muted">
          {pending} of {sheet.findings.length} finding{sheet.findings.length === 1 ? "" : "s"} still to decide before the sheet can be signed.
        </p>
      )}
      {sheet.verdict === "pending" && !sheet.may.signoff && !active && <p className="text-sm text-ink-muted">Not signed yet.</p>}
      {sheet.verdict === "pending" && sheet.may.signoff && pending === 0 && (
        <form
          className="space-y-3"
          onSubmit={(e) => {
            e.preventDefault();
            void post("signoff", { verdict: effectiveVerdict, meaning, password });
          }}
        >
          <fieldset className="space-y-1">
            <legend className="text-sm font-medium">Verdict</legend>
            {(["passed", "failed"] as const).map((v) => (
              <label key={v} className="mr-4 inline-flex items-center gap-1.5 text-sm">
                <input type="radio" name="verdict" value={v} checked={effectiveVerdict === v} disabled={v === "passed" && rejected > 0} onChange={() => { setVerdict(v); setMeaning("reviewed"); }} className="accent-accent" />
                {v === "passed" ? "Passed" : "Failed"}
              </label>
            ))}
            {rejected > 0 && <p className="text-xs text-ink-muted">{rejected} finding{rejected === 1 ? " is" : "s are"} rejected, so the sheet can only fail.</p>}
          </fieldset>
          <div className="space-y-1">
            <label htmlFor="meaning" className="block text-sm font-medium">My signature means</label>
            <select id="meaning" value={meaning} onChange={(e) => setMeaning(e.target.value as Meaning)} className="block w-full rounded-md border border-rule bg-surface px-2 py-1.5 text-sm">
              {MEANINGS_FOR[effectiveVerdict].map((m) => (
                <option key={m} value={m}>{MEANING_LABELS[m]}</option>
              ))}
            </select>
          </div>
          <div className="space-y-1">
            <label htmlFor="signoff-password" className="block text-sm font-medium">Your password, to sign</label>
            <input id="signoff-password" type="password" autoComplete="current-password" required value={password} onChange={(e) => setPassword(e.target.value)} className="block w-full rounded-md border border-rule bg-surface px-2 py-1.5 text-sm" />
          </div>
          {error && <p role="alert" className="text-sm text-danger">{error}</p>}
          <button type="submit" disabled={busy} className={`rounded-md px-4 py-2 text-sm font-medium text-white disabled:opacity-60 ${effectiveVerdict === "passed" ? "bg-ok" : "bg-danger"}`}>
            Sign sheet as {effectiveVerdict}
          </button>
        </form>
      )}
      {sheet.may.reopen && (
        <form
          className="space-y-2 border-t border-rule pt-3"
          onSubmit={(e) => {
            e.preventDefault();
            void post("reopen", { reason });
          }}
        >
          <label htmlFor="reopen-reason" className="block text-sm font-medium">Reopen the sheet (administrator): reason</label>
          <textarea id="reopen-reason" required rows={2} value={reason} onChange={(e) => setReason(e.target.value)} className="block w-full rounded-md border border-rule bg-surface px-2 py-1.5 text-sm" />
          {error && <p role="alert" className="text-sm text-danger">{error}</p>}
          <button type="submit" disabled={busy} className="rounded-md border border-rule bg-surface px-3 py-1.5 text-sm font-medium hover:bg-paper">Reopen sheet</button>
        </form>
      )}
      {sheet.signatures.some((s) => s.reopenedAt) && (
        <details className="text-sm">
          <summary className="cursor-pointer text-ink-muted">Earlier signatures</summary>
          <ul className="mt-2 space-y-2">
            {sheet.signatures.filter((s) => s.reopenedAt).map((s) => (
              <li key={s.id} className="rounded border border-rule p-2">
                Signed {s.verdict} by {s.signerName}, <LocalTime iso={s.signedAt} />; reopened by {s.reopenedBy}, <LocalTime iso={s.reopenedAt!} />: “{s.reopenReason}”
              </li>
            ))}
          </ul>
        </details>
      )}
    </section>
  );
}
