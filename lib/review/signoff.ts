// Signing a sheet off: once every finding is decided, a reviewer signs the sheet passed or failed, re-entering
// their password and choosing what the signature means. The signature keeps name, role, meaning, time (UTC) and
// the sha256 of the inspection's canonical record, so any later change to the record shows. A signed sheet is
// locked; only an administrator reopens it, with a reason. Every step (a refused password too) is audited.
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { findings, inspections, sheetSignoffs, users, SIGNATURE_MEANINGS, type SheetSignoff } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import { verifyPassword } from "@/lib/auth/password";
import { authorize, ROLE_LABELS, type Actor } from "@/lib/auth/policy";
import { AppError } from "@/lib/errors";
import { enqueueMail } from "@/lib/queue/queues";
import { assertOpen } from "./decisions";
import { loadSheetFor } from "./load";
import { recordSha256 } from "./record";

export type SignatureMeaning = (typeof SIGNATURE_MEANINGS)[number];
export type SheetVerdict = "passed" | "failed";

export const MEANING_LABELS: Record<SignatureMeaning, string> = {
  reviewed: "Reviewed",
  approved_for_release: "Approved for release",
  rejected: "Rejected",
};

/** Which meanings a verdict may carry: a failed sheet is never approved for release, a passed one never rejected. */
export const MEANINGS_FOR: Record<SheetVerdict, readonly SignatureMeaning[]> = {
  passed: ["reviewed", "approved_for_release"],
  failed: ["reviewed", "rejected"],
};

export interface SignInput {
  inspectionId: number;
  verdict: SheetVerdict;
  meaning: SignatureMeaning;
  password: string;
}

export interface SignatureView {
  id: number;
  signerName: string;
  signerRole: string;
  meaning: SignatureMeaning;
  verdict: SheetVerdict;
  signedAt: string;
  recordSha256: string;
  /** The record as it is now still hashes to what was signed. */
  intact: boolean;
  reopenedBy: string | null;
  reopenedAt: string | null;
  reopenReason: string | null;
}

export const wrongPassword = () => new AppError("wrong_password", "That password is not right. The sheet was not signed.", 403);

export async function signSheet(actor: Actor, input: SignInput): Promise<SignatureView> {
  if (!MEANINGS_FOR[input.verdict]?.includes(input.meaning)) {
    throw new AppError(
      "bad_meaning",
      input.verdict === "passed" ? "A passed sheet is signed as “reviewed” or “approved for release”." : "A failed sheet is signed as “reviewed” or “rejected”.",
      422,
    );
  }
  // Checked before the password so a reviewer without the right learns nothing from a password try.
  const sheet = await loadSheetFor(actor, input.inspectionId, "sheet.signoff");
  const [me] = await db.select({ passwordHash: users.passwordHash, disabled: users.disabled }).from(users).where(eq(users.id, actor.id));
  if (!me?.passwordHash || me.disabled || !(await verifyPassword(me.passwordHash, input.password ?? ""))) {
    await recordAudit(db, {
      actorId: actor.id,
      action: "sheet.signoff_refused",
      subjectType: "inspection",
      subjectId: input.inspectionId,
      details: { jobId: sheet.job.id, reason: "wrong_password" },
    });
    throw wrongPassword();
  }
  const signed = await db.transaction(async (tx) => {
    const locked = await loadSheetFor(actor, input.inspectionId, "sheet.signoff", tx, true);
    assertOpen(locked);
    const rows = await tx.select({ decision: findings.decision }).from(findings).where(eq(findings.inspectionId, input.inspectionId));
    const pending = rows.filter((r) => r.decision === "pending").length;
    if (pending > 0) {
      throw new AppError("findings_pending", `${pending} finding${pending === 1 ? " is" : "s are"} not decided yet. Decide every finding before signing.`, 409);
    }
    const rejected = rows.filter((r) => r.decision === "rejected").length;
    if (input.verdict === "passed" && rejected > 0) {
      throw new AppError("rejected_findings", `A sheet with ${rejected} rejected finding${rejected === 1 ? "" : "s"} cannot pass. Sign it as failed, or undo the rejection.`, 409);
    }
    const hash = await recordSha256(input.inspectionId, tx);
    const signedAt = new Date();
    const row = {
      inspectionId: input.inspectionId,
      signedBy: actor.id,
      signerName: actor.name,
      signerRole: actor.role,
      meaning: input.meaning,
      verdict: input.verdict,
      recordSha256: hash,
      signedAt,
    };
    const [{ id }] = await tx.insert(sheetSignoffs).values(row).$returningId();
    await tx
      .update(inspections)
      .set({
        verdict: input.verdict,
        signedBy: actor.id,
        signedAt,
        signature: `${actor.name} (${ROLE_LABELS[actor.role]}), ${MEANING_LABELS[input.meaning]}, ${input.verdict}, ${signedAt.toISOString()}`,
        version: sql`${inspections.version} + 1`,
      })
      .where(eq(inspections.id, input.inspectionId));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "sheet.signoff",
      subjectType: "inspection",
      subjectId: input.inspectionId,
      details: { jobId: locked.job.id, signoffId: id, verdict: input.verdict, meaning: input.meaning, recordSha256: hash, findings: rows.length, rejected },
    });
    return { id, ...row };
  });
  // After the commit: the e-mail job is idempotent per signature and retried by the mail queue.
  await enqueueMail({ kind: "sheet_signed", inspectionId: input.inspectionId, signoffId: signed.id }, signed.id).catch((error) =>
    console.error(`sign-off ${signed.id}: queueing the e-mail failed`, error),
  );
  // A failed sheet also tells QA and prepress which stack of sheets to pull from the delivery.
  if (input.verdict === "failed") {
    await enqueueMail({ kind: "sheet_failed", inspectionId: input.inspectionId, reason: "verdict_failed" }, signed.id).catch((error) =>
      console.error(`sign-off ${signed.id}: queueing the span-to-pull e-mail failed`, error),
    );
  }
  return toView({ ...signed, reopenedBy: null, reopenedAt: null, reopenReason: null }, signed.recordSha256, new Map());
}

export async function reopenSheet(actor: Actor, input: { inspectionId: number; reason: string }): Promise<void> {
  const reason = input.reason?.trim();
  if (!reason) throw new AppError("reason_required", "Say why the sheet is reopened; the reason is kept with the signature.", 422);
  if (reason.length > 2000) throw new AppError("reason_too_long", "A reason may have at most 2000 characters.", 422);
  await db.transaction(async (tx) => {
    const sheet = await loadSheetFor(actor, input.inspectionId, "inspection.read", tx, true);
    authorize(actor, "sheet.reopen", { customerId: sheet.job.customerId });
    const [active] = await tx
      .select()
      .from(sheetSignoffs)
      .where(and(eq(sheetSignoffs.inspectionId, input.inspectionId), isNull(sheetSignoffs.reopenedAt)))
      .orderBy(desc(sheetSignoffs.id))
      .limit(1);
    if (!active || sheet.inspection.verdict === "pending") throw new AppError("not_signed", "This sheet is not signed, so there is nothing to reopen.", 409);
    const now = new Date();
    await tx.update(sheetSignoffs).set({ reopenedBy: actor.id, reopenedAt: now, reopenReason: reason }).where(eq(sheetSignoffs.id, active.id));
    await tx
      .update(inspections)
      .set({ verdict: "pending", signedBy: null, signedAt: null, signature: null, version: sql`${inspections.version} + 1` })
      .where(eq(inspections.id, input.inspectionId));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "sheet.reopen",
      subjectType: "inspection",
      subjectId: input.inspectionId,
      details: { jobId: sheet.job.id, signoffId: active.id, reason, verdictWas: sheet.inspection.verdict },
    });
  });
}

function toView(s: SheetSignoff, currentHash: string, names: Map<number, string>): SignatureView {
  return {
    id: s.id,
    signerName: s.signerName,
    signerRole: s.signerRole,
    meaning: s.meaning,
    verdict: s.verdict,
    signedAt: s.signedAt.toISOString(),
    recordSha256: s.recordSha256,
    intact: s.reopenedAt ? true : currentHash === s.recordSha256,
    reopenedBy: s.reopenedBy ? (names.get(s.reopenedBy) ?? "An administrator") : null,
    reopenedAt: s.reopenedAt ? s.reopenedAt.toISOString() : null,
    reopenReason: s.reopenReason,
  };
}

/**
 * Every signature of a sheet, newest first, each checked against the record as it is now: the active one (not
 * reopened) must still hash to what was signed; a reopened one is history (its record was allowed to change).
 */
export async function listSignatures(actor: Actor, inspectionId: number): Promise<SignatureView[]> {
  await loadSheetFor(actor, inspectionId, "inspection.read");
  const rows = await db.select().from(sheetSignoffs).where(eq(sheetSignoffs.inspectionId, inspectionId)).orderBy(desc(sheetSignoffs.id));
  if (rows.length === 0) return [];
  const current = await recordSha256(inspectionId);
  const reopeners = rows.flatMap((r) => (r.reopenedBy ? [r.reopenedBy] : []));
  const names = new Map<number, string>();
  for (const id of new Set(reopeners)) {
    const [u] = await db.select({ name: users.name }).from(users).where(eq(users.id, id));
    if (u) names.set(id, u.name);
  }
  return rows.map((r) => toView(r, current, names));
}
