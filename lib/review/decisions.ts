// Deciding findings: a reviewer accepts a finding (no defect, or within tolerance) or rejects it (a defect, with
// a comment), or undoes a decision, until the sheet is signed. Every change names the version of the finding it
// saw; a stale one is refused with 409 naming who changed the finding first and when, never overwritten.
import { eq, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { findings, inspections, users, type FindingRow } from "@/db/schema";
import { recordAudit } from "@/lib/audit";
import type { Actor } from "@/lib/auth/policy";
import { AppError, notFound } from "@/lib/errors";
import { loadRun, memoryChanges, writeMemory } from "@/lib/run/memory-store";
import { lockSheetForDecision, type SheetRow } from "./load";

export type Decision = "accepted" | "rejected";
export type DecisionReason = "no_defect" | "within_tolerance" | "defect";

/** Which reasons go with which decision. */
export const REASONS_FOR: Record<Decision, readonly DecisionReason[]> = {
  accepted: ["no_defect", "within_tolerance"],
  rejected: ["defect"],
};

export const REASON_LABELS: Record<DecisionReason, string> = {
  no_defect: "No defect",
  within_tolerance: "Within tolerance",
  defect: "Defect",
};

export const MAX_COMMENT_LENGTH = 2000;

/** A decision made on a version that is no longer current. Carries who changed the finding first and when. */
export class StaleDecisionError extends AppError {
  constructor(
    message: string,
    readonly decidedBy: string | null,
    readonly decidedAt: string | null,
    readonly currentVersion: number,
  ) {
    super("stale_decision", message, 409);
  }
}

export interface DecideInput {
  inspectionId: number;
  findingId: number;
  /** The finding's version the reviewer saw. */
  version: number;
  decision: Decision;
  reason: DecisionReason;
  comment?: string | null;
  /** The reviewer confirmed the suggestion of an earlier sheet's accepted finding at the same place. */
  confirmsPrior?: boolean;
}

export interface DecisionResult {
  findingId: number;
  decision: "pending" | Decision;
  reason: DecisionReason | null;
  comment: string | null;
  decidedBy: string | null;
  decidedAt: string | null;
  version: number;
}

export const sheetLocked = () =>
  new AppError("sheet_signed", "This sheet is signed off and locked. An administrator can reopen it, giving a reason.", 409);

/** A signed sheet (verdict passed or failed) takes no decisions until an administrator reopens it. */
export function assertOpen(sheet: { inspection: Pick<SheetRow["inspection"], "verdict" | "status"> }): void {
  if (sheet.inspection.verdict !== "pending") throw sheetLocked();
  if (sheet.inspection.status !== "done") {
    throw new AppError("inspection_not_done", "This sheet's inspection has not finished; there is nothing to decide yet.", 409);
  }
}

const verbs = { accepted: "accepted", rejected: "rejected", pending: "undid the decision on" } as const;

async function staleError(finding: FindingRow, tx: Parameters<Parameters<typeof db.transaction>[0]>[0]) {
  const [by] = finding.decidedBy ? await tx.select({ name: users.name }).from(users).where(eq(users.id, finding.decidedBy)) : [];
  const at = finding.decidedAt ? finding.decidedAt.toISOString() : null;
  const when = at ? ` at ${at.slice(0, 16).replace("T", " ")} UTC` : "";
  const who = by?.name ?? "Someone";
  return new StaleDecisionError(
    `${who} ${verbs[finding.decision]} this finding first${when}. Nothing of yours was saved; look at the finding again and decide once more if needed.`,
    by?.name ?? null,
    at,
    finding.version,
  );
}

function checkDecision(input: DecideInput): string | null {
  if (!REASONS_FOR[input.decision]?.includes(input.reason)) {
    throw new AppError(
      "bad_reason",
      input.decision === "accepted"
        ? "An accepted finding needs the reason “no defect” or “within tolerance”."
        : "A rejected finding is a defect: choose the reason “defect”.",
      422,
    );
  }
  const comment = input.comment?.trim() || null;
  if (input.decision === "rejected" && !comment) {
    throw new AppError("comment_required", "Say in a comment what is wrong when you reject a finding.", 422);
  }
  if (comment && comment.length > MAX_COMMENT_LENGTH) {
    throw new AppError("comment_too_long", `A comment may have at most ${MAX_COMMENT_LENGTH} characters.`, 422);
  }
  return comment;
}

async function changeFinding(
  actor: Actor,
  input: { inspectionId: number; findingId: number; version: number },
  change: { decision: "pending" | Decision; reason: DecisionReason | null; comment: string | null; confirmsPrior?: boolean },
  auditAction: string,
): Promise<DecisionResult> {
  return db.transaction(async (tx) => {
    // The sheet and the finding locked in one statement; while the sheet is locked no other decision of the run
    // (they lock the run's revision row too) can change what run memory is computed from below.
    const sheet = await lockSheetForDecision(actor, input.inspectionId, input.findingId, tx);
    assertOpen(sheet);
    const finding = sheet.finding;
    if (!finding) throw notFound("The finding");
    if (finding.version !== input.version) throw await staleError(finding, tx);
    if (change.decision === "pending" && finding.decision === "pending") {
      throw new AppError("not_decided", "This finding has no decision to undo.", 409);
    }
    // Later sheets of the run may now be pre-marked "accepted on sheet N" (or no longer, after an undo): the run as
    // it will be once this decision is written (the decision is the only input of run memory that changes here).
    const run = await loadRun(tx, sheet.revisionId);
    const decided = run && { ...run, findings: run.findings.map((f) => (f.id === finding.id ? { ...f, decision: change.decision } : f)) };
    const decidedAt = new Date();
    // Independent writes (other columns or other rows), sent together.
    await Promise.all([
      tx
        .update(findings)
        .set({ decision: change.decision, decisionReason: change.reason, comment: change.comment, decidedBy: actor.id, decidedAt, version: finding.version + 1 })
        .where(eq(findings.id, finding.id)),
      tx.update(inspections).set({ version: sql`${inspections.version} + 1` }).where(eq(inspections.id, input.inspectionId)),
      decided ? writeMemory(tx, memoryChanges(decided)) : undefined,
      recordAudit(tx, {
        actorId: actor.id,
        action: auditAction,
        subjectType: "finding",
        subjectId: finding.id,
        details: {
          inspectionId: input.inspectionId,
          jobId: sheet.jobId,
          from: finding.decision,
          to: change.decision,
          reason: change.reason,
          comment: change.comment,
          version: finding.version + 1,
          ...(change.confirmsPrior && finding.priorFindingId ? { confirmsPriorFindingId: finding.priorFindingId } : {}),
        },
      }),
    ]);
    return {
      findingId: finding.id,
      decision: change.decision,
      reason: change.reason,
      comment: change.comment,
      decidedBy: actor.name,
      decidedAt: decidedAt.toISOString(),
      version: finding.version + 1,
    };
  });
}

/** Accept or reject one finding (policy: finding.decide). */
export async function decideFinding(actor: Actor, input: DecideInput): Promise<DecisionResult> {
  const comment = checkDecision(input);
  return changeFinding(actor, input, { decision: input.decision, reason: input.reason, comment, confirmsPrior: input.confirmsPrior }, "finding.decide");
}

/** Put a decided finding back to pending; allowed until the sheet is signed (policy: finding.decide). */
export async function undoDecision(actor: Actor, input: { inspectionId: number; findingId: number; version: number }): Promise<DecisionResult> {
  return changeFinding(actor, input, { decision: "pending", reason: null, comment: null }, "finding.undo");
}
