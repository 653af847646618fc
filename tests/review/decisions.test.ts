// Deciding findings: accept/reject with reasons, a comment required for a reject, a stale version refused with
// 409 naming who decided first and when, undo until sign-off, and no decision at all once the sheet is signed.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { auditEvents, findings } from "@/db/schema";
import { decideFinding, StaleDecisionError, undoDecision } from "@/lib/review/decisions";
import { signSheet } from "@/lib/review/signoff";
import { closeQueues } from "@/lib/queue/queues";
import { makeSheet, PASSWORD, type Sheet } from "./support";

let s: Sheet;
const findingRow = async (id: number) => (await db.select().from(findings).where(eq(findings.id, id)))[0];
const rejection = (error: unknown) => error as { status: number; code: string; message: string };

beforeAll(async () => {
  s = await makeSheet(3);
});
afterAll(async () => {
  await closeQueues();
  await closeDb();
});

describe("deciding findings", () => {
  it("a reviewer rejects a finding with a comment; the decision, its reason, the new version and an audit event are stored", async () => {
    const [first] = s.findingIds;
    const result = await decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: first, version: 0, decision: "rejected", reason: "defect", comment: "Hickey in the logo" });
    expect(result).toMatchObject({ decision: "rejected", reason: "defect", comment: "Hickey in the logo", version: 1, decidedBy: s.actors.reviewer.name });
    const row = await findingRow(first);
    expect(row).toMatchObject({ decision: "rejected", decisionReason: "defect", decidedBy: s.actors.reviewer.id, version: 1 });
    const events = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "finding.decide"), eq(auditEvents.subjectId, String(first))));
    expect(events).toHaveLength(1);
    expect(events[0].details).toMatchObject({ to: "rejected", reason: "defect", inspectionId: s.inspectionId });
  });

  it("a reject without a comment, or with a reason that does not fit, is refused and changes nothing", async () => {
    const id = s.findingIds[1];
    await expect(decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: id, version: 0, decision: "rejected", reason: "defect", comment: "  " })).rejects.toMatchObject({ status: 422, code: "comment_required" });
    await expect(decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: id, version: 0, decision: "accepted", reason: "defect" })).rejects.toMatchObject({ status: 422, code: "bad_reason" });
    expect(await findingRow(id)).toMatchObject({ decision: "pending", version: 0 });
  });

  it("a second reviewer's decision on the version they saw before gets 409 naming who decided first and when", async () => {
    const [first] = s.findingIds;
    const error = rejection(
      await decideFinding(s.actors.reviewer2, { inspectionId: s.inspectionId, findingId: first, version: 0, decision: "accepted", reason: "no_defect" }).catch((e) => e),
    );
    expect(error).toBeInstanceOf(StaleDecisionError);
    expect(error.status).toBe(409);
    const row = await findingRow(first);
    expect(error.message).toContain(s.actors.reviewer.name);
    expect(error.message).toContain("rejected");
    expect(error.message).toContain(row.decidedAt!.toISOString().slice(0, 16).replace("T", " "));
    expect((error as StaleDecisionError).decidedAt).toBe(row.decidedAt!.toISOString());
    // Never a silent overwrite.
    expect(row).toMatchObject({ decision: "rejected", decidedBy: s.actors.reviewer.id, version: 1 });
  });

  it("undo puts a finding back to pending; undoing with a stale version is refused; undo of a pending finding is refused", async () => {
    const [first] = s.findingIds;
    await expect(undoDecision(s.actors.reviewer2, { inspectionId: s.inspectionId, findingId: first, version: 0 })).rejects.toMatchObject({ status: 409, code: "stale_decision" });
    const undone = await undoDecision(s.actors.reviewer2, { inspectionId: s.inspectionId, findingId: first, version: 1 });
    expect(undone).toMatchObject({ decision: "pending", reason: null, comment: null, version: 2 });
    await expect(undoDecision(s.actors.reviewer2, { inspectionId: s.inspectionId, findingId: first, version: 2 })).rejects.toMatchObject({ status: 409, code: "not_decided" });
    const events = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "finding.undo"), eq(auditEvents.subjectId, String(first))));
    expect(events).toHaveLength(1);
  });

  it("roles without finding.decide get 403; another customer's user gets 404; a finding of another sheet is 404", async () => {
    const input = { inspectionId: s.inspectionId, findingId: s.findingIds[1], version: 0, decision: "accepted" as const, reason: "no_defect" as const };
    await expect(decideFinding(s.actors.qa, input)).rejects.toMatchObject({ status: 403 });
    await expect(decideFinding(s.actors.prepress, input)).rejects.toMatchObject({ status: 403 });
    await expect(decideFinding(s.actors.customer, input)).rejects.toMatchObject({ status: 403 });
    await expect(decideFinding(s.actors.otherCustomer, input)).rejects.toMatchObject({ status: 404 });
    const other = await makeSheet(1);
    await expect(decideFinding(s.actors.reviewer, { ...input, findingId: other.findingIds[0] })).rejects.toMatchObject({ status: 404 });
  });

  it("after sign-off every decision and undo is refused (the sheet is locked)", async () => {
    const v = async (id: number) => (await findingRow(id)).version;
    await decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: s.findingIds[0], version: await v(s.findingIds[0]), decision: "rejected", reason: "defect", comment: "Hickey in the logo" });
    for (const id of s.findingIds.slice(1)) {
      await decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: id, version: await v(id), decision: "accepted", reason: "within_tolerance" });
    }
    await signSheet(s.actors.reviewer, { inspectionId: s.inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD });
    const id = s.findingIds[1];
    await expect(decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: id, version: await v(id), decision: "accepted", reason: "no_defect" })).rejects.toMatchObject({ status: 409, code: "sheet_signed" });
    await expect(undoDecision(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: id, version: await v(id) })).rejects.toMatchObject({ status: 409, code: "sheet_signed" });
  });
});
