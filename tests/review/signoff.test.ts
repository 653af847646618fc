// Sign-off: only once every finding is decided, with the password re-entered (a wrong one refused and audited),
// a meaning that fits the verdict, a sha256 over the canonical record that is recomputed later (a tampered
// finding shows), the sheet locked until an administrator reopens it with a reason, and the e-mail to the
// customer's contacts and prepress (read back from the mail fake's REST API).
import type { Job } from "bullmq";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { auditEvents, findings, inspections, sheetSignoffs } from "@/db/schema";
import type { MailData } from "@/lib/queue/queues";
import { closeQueues } from "@/lib/queue/queues";
import { decideFinding } from "@/lib/review/decisions";
import { canonicalJson, recordSha256 } from "@/lib/review/record";
import { listSignatures, reopenSheet, signSheet } from "@/lib/review/signoff";
import { sendPipelineMail } from "@/worker/mail";
import { makeSheet, PASSWORD, type Sheet } from "./support";

let s: Sheet;
const inbox = `http://127.0.0.1:${process.env.MAILDEV_WEB_PORT ?? "1080"}/api/email`;
const sign = (over: Partial<Parameters<typeof signSheet>[1]> = {}) =>
  signSheet(s.actors.reviewer, { inspectionId: s.inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD, ...over });
const version = async (id: number) => (await db.select().from(findings).where(eq(findings.id, id)))[0].version;

beforeAll(async () => {
  s = await makeSheet(2);
});
afterAll(async () => {
  await closeQueues();
  await closeDb();
});

describe("canonical record", () => {
  it("canonicalJson sorts keys at every level, so key order never changes the hash", () => {
    expect(canonicalJson({ b: 1, a: { d: [2, { f: 1, e: null }], c: "x" } })).toBe('{"a":{"c":"x","d":[2,{"e":null,"f":1}]},"b":1}');
    expect(canonicalJson({ a: 1, b: 2 })).toBe(canonicalJson({ b: 2, a: 1 }));
  });
});

describe("signing a sheet off", () => {
  it("is refused while findings are pending", async () => {
    await expect(sign()).rejects.toMatchObject({ status: 409, code: "findings_pending" });
  });

  it("a wrong password is refused, audited, and signs nothing", async () => {
    const [a, b] = s.findingIds;
    await decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: a, version: 0, decision: "rejected", reason: "defect", comment: "Spot of magenta on the lid flap" });
    await decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: b, version: 0, decision: "accepted", reason: "within_tolerance" });
    await expect(sign({ password: "not the password" })).rejects.toMatchObject({ status: 403, code: "wrong_password" });
    const refused = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "sheet.signoff_refused"), eq(auditEvents.subjectId, String(s.inspectionId))));
    expect(refused).toHaveLength(1);
    expect(refused[0].actorId).toBe(s.actors.reviewer.id);
    expect(await db.select().from(sheetSignoffs).where(eq(sheetSignoffs.inspectionId, s.inspectionId))).toHaveLength(0);
  });

  it("a meaning that does not fit the verdict, or a pass with a rejected finding, is refused", async () => {
    await expect(sign({ verdict: "failed", meaning: "approved_for_release" })).rejects.toMatchObject({ status: 422, code: "bad_meaning" });
    await expect(sign({ verdict: "passed", meaning: "approved_for_release" })).rejects.toMatchObject({ status: 409, code: "rejected_findings" });
  });

  it("QA and customers may not sign; another customer's user gets 404", async () => {
    for (const who of [s.actors.qa, s.actors.customer]) {
      await expect(signSheet(who, { inspectionId: s.inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD })).rejects.toMatchObject({ status: 403 });
    }
    await expect(signSheet(s.actors.otherCustomer, { inspectionId: s.inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD })).rejects.toMatchObject({ status: 404 });
  });

  let signoffId: number;
  it("signs with name, role, meaning, UTC time and the record's sha256; the sheet's verdict is set", async () => {
    const before = await recordSha256(s.inspectionId);
    const view = await sign();
    signoffId = view.id;
    expect(view).toMatchObject({ signerName: s.actors.reviewer.name, signerRole: "reviewer", meaning: "rejected", verdict: "failed", intact: true, recordSha256: before });
    expect(view.signedAt).toMatch(/Z$/);
    const [row] = await db.select().from(sheetSignoffs).where(eq(sheetSignoffs.id, view.id));
    expect(row.recordSha256).toMatch(/^[0-9a-f]{64}$/);
    const [i] = await db.select().from(inspections).where(eq(inspections.id, s.inspectionId));
    expect(i).toMatchObject({ verdict: "failed", signedBy: s.actors.reviewer.id });
    await expect(sign()).rejects.toMatchObject({ status: 409, code: "sheet_signed" });
  });

  it("the record hash is recomputed when read: a finding changed behind the application's back shows as changed", async () => {
    expect((await listSignatures(s.actors.customer, s.inspectionId))[0].intact).toBe(true);
    const id = s.findingIds[1];
    await db.update(findings).set({ deltaE00Max: 1.5 }).where(eq(findings.id, id));
    const [tampered] = await listSignatures(s.actors.customer, s.inspectionId);
    expect(tampered.intact).toBe(false);
    await db.update(findings).set({ deltaE00Max: 10.1 }).where(eq(findings.id, id));
    expect((await listSignatures(s.actors.customer, s.inspectionId))[0].intact).toBe(true);
  });

  it("e-mails the job's customer contacts and prepress, with the verdict, signer and fingerprint", async () => {
    const job = { data: { kind: "sheet_signed", inspectionId: s.inspectionId, signoffId } satisfies MailData } as Job<MailData>;
    const { sent } = await sendPipelineMail(job);
    expect(sent).toBeGreaterThanOrEqual(3);
    interface Mail {
      to: { address: string }[];
      subject: string;
      text: string;
    }
    let mail: Mail | undefined;
    for (let i = 0; i < 50 && !mail; i++) {
      const all = (await (await fetch(inbox)).json()) as Mail[];
      mail = all.find((m) => m.to.some((t) => t.address === s.contacts[0]));
      if (!mail) await new Promise((r) => setTimeout(r, 100));
    }
    expect(mail).toBeDefined();
    const to = mail!.to.map((t) => t.address);
    expect(to).toEqual(expect.arrayContaining([...s.contacts, s.actors.prepress.email]));
    expect(to).not.toContain(s.actors.qa.email);
    expect(mail!.subject).toContain("failed");
    expect(mail!.text).toContain(s.actors.reviewer.name);
    expect(mail!.text).toContain(await recordSha256(s.inspectionId));
  });

  it("only an administrator reopens, with a reason; then decisions are possible again and the old signature is history", async () => {
    await expect(reopenSheet(s.actors.reviewer, { inspectionId: s.inspectionId, reason: "Wrong sheet" })).rejects.toMatchObject({ status: 403 });
    await expect(reopenSheet(s.actors.admin, { inspectionId: s.inspectionId, reason: " " })).rejects.toMatchObject({ status: 422 });
    await reopenSheet(s.actors.admin, { inspectionId: s.inspectionId, reason: "Customer asked for a second look at the lid flap" });
    const [i] = await db.select().from(inspections).where(eq(inspections.id, s.inspectionId));
    expect(i.verdict).toBe("pending");
    const id = s.findingIds[1];
    await decideFinding(s.actors.reviewer, { inspectionId: s.inspectionId, findingId: id, version: await version(id), decision: "accepted", reason: "no_defect" });
    const [old] = await listSignatures(s.actors.admin, s.inspectionId);
    expect(old).toMatchObject({ reopenedBy: s.actors.admin.name, reopenReason: "Customer asked for a second look at the lid flap" });
    const events = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "sheet.reopen"), eq(auditEvents.subjectId, String(s.inspectionId))));
    expect(events).toHaveLength(1);
  });
});
