// Traceability of a press run: sheets in sheet-number order with verdicts and signatures, the sampling in words,
// the span to pull around a failed sheet (shown, in the CSV, and e-mailed to QA), a customer user reading only
// their own run, a repeated sheet number refused with nothing stored, and the CSV checked against RFC 4180
// (IETF RFC 4180 §2: CRLF line ends, optional header line, fields holding a comma, double quote or line break
// enclosed in double quotes, a double quote inside doubled) by an independent reader written from the RFC's grammar.
import "../pipeline/support/test-env";
import { and, eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb, db } from "@/db/client";
import { scans } from "@/db/schema";
import type { Actor } from "@/lib/auth/policy";
import { closeQueues } from "@/lib/queue/queues";
import { decideFinding } from "@/lib/review/decisions";
import { signSheet } from "@/lib/review/signoff";
import { CSV_HEADER, inert } from "@/lib/run/csv";
import { getRunView } from "@/lib/run/traceability";
import { sendPipelineMail } from "@/worker/mail";
import { ensureBucket, listKeys } from "@/storage/objects";
import { multipart } from "../pipeline/support/fixtures";
import { makeRun, PASSWORD, type RunFixture } from "./support";

let actor: Actor;
vi.mock("@/lib/auth/request-actor", () => ({ requestActor: async () => actor }));
const { GET: getCsv } = await import("@/app/api/v1/jobs/[jobId]/run/sheets.csv/route");
const { GET: getRun } = await import("@/app/api/v1/jobs/[jobId]/run/route");
const { POST: postScans } = await import("@/app/api/v1/jobs/[jobId]/scans/route");

let run: RunFixture;
const tricky = 'sheet "300", left\r\nhalf.png';
const sheet = (n: number) => run.sheets.find((s) => s.sheetNumber === n)!;
const params = () => ({ params: Promise.resolve({ jobId: String(run.jobId) }) });

/** RFC 4180 §2 grammar: file = [header CRLF] record *(CRLF record) [CRLF]; escaped = DQUOTE *(TEXTDATA / COMMA / CR / LF / 2DQUOTE) DQUOTE. */
function readRfc4180(text: string): string[][] {
  const records: string[][] = [];
  let i = 0;
  while (i < text.length) {
    const record: string[] = [];
    for (;;) {
      let field = "";
      if (text[i] === '"') {
        i++;
        for (;;) {
          if (i >= text.length) throw new Error("unterminated quoted field");
          if (text[i] === '"' && text[i + 1] === '"') {
            field += '"';
            i += 2;
          } else if (text[i] === '"') break;
          else field += text[i++];
        }
        i++;
      } else {
        while (i < text.length && text[i] !== "," && text[i] !== "\r" && text[i] !== "\n") {
          if (text[i] === '"') throw new Error(`bare quote in an unquoted field at ${i}`);
          field += text[i++];
        }
      }
      record.push(field);
      if (text[i] === ",") {
        i++;
        continue;
      }
      if (text.startsWith("\r\n", i)) i += 2;
      else if (i < text.length) throw new Error(`a record must end in CRLF (at ${i})`);
      break;
    }
    records.push(record);
  }
  return records;
}

beforeAll(async () => {
  await ensureBucket();
  run = await makeRun([
    { sheetNumber: 250, drift: 1.4 },
    { sheetNumber: 100, drift: 0.9 },
    { sheetNumber: 150, drift: 2.2, findings: [[40_000, 30_000, 1]] },
    { sheetNumber: 200, drift: 1.0 },
    { sheetNumber: 300, drift: 1.2, fileName: tricky },
  ]);
  const reviewer = run.actors.reviewer;
  await decideFinding(reviewer, { inspectionId: sheet(150).inspectionId, findingId: sheet(150).findingIds[0], version: 0, decision: "rejected", reason: "defect", comment: 'Hickey, "comet" shape, on the lid' });
  await signSheet(reviewer, { inspectionId: sheet(150).inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD });
  for (const n of [100, 200]) await signSheet(reviewer, { inspectionId: sheet(n).inspectionId, verdict: "passed", meaning: "approved_for_release", password: PASSWORD });
}, 60_000);
afterAll(async () => {
  await closeQueues();
  await closeDb();
});

describe("the run's traceability", () => {
  it("lists the sheets in sheet-number order with verdicts, signatures and the sampling", async () => {
    const view = await getRunView(run.actors.qa, run.jobId);
    expect(view.sheets.map((s) => s.sheetNumber)).toEqual([100, 150, 200, 250, 300]);
    expect(view.sheets.map((s) => s.verdict)).toEqual(["passed", "failed", "passed", "pending", "pending"]);
    // 400 / 5 = 80.
    expect(view.sampling).toBe("5 of 400 sheets, about one in 80");
    const failed = view.sheets[1];
    expect(failed).toMatchObject({ findings: 1, rejectedFindings: 1, signedBy: run.actors.reviewer.name, spanToPull: "sheets 101 to 199" });
    expect(failed.recordSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(view.spans).toEqual([{ from: 101, to: 199, failedSheets: [150], text: "sheets 101 to 199", sheets: 99 }]);
  });

  it("a customer user reads their own run; another customer's user gets 404", async () => {
    expect((await getRunView(run.actors.customer, run.jobId)).sheets).toHaveLength(5);
    await expect(getRunView(run.actors.otherCustomer, run.jobId)).rejects.toMatchObject({ status: 404 });
    actor = run.actors.otherCustomer;
    const refused = await getRun(new Request(`http://127.0.0.1/api/v1/jobs/${run.jobId}/run`), params());
    expect(refused.status).toBe(404);
    expect(await refused.text()).not.toContain("Fernwhistle");
  });

  it("e-mails QA the span to pull when a sheet is signed failed", async () => {
    const job = { data: { kind: "sheet_failed", inspectionId: sheet(150).inspectionId, reason: "verdict_failed" } } as Parameters<typeof sendPipelineMail>[0];
    expect((await sendPipelineMail(job)).sent).toBeGreaterThan(0);
    const inbox = `${process.env.MAILDEV_URL ?? "http://127.0.0.1:1090"}/api/email`;
    type Mail = { subject: string; text: string; to: { address: string }[] };
    let mail: Mail | undefined;
    for (let i = 0; i < 50 && !mail; i++) {
      mail = ((await (await fetch(inbox)).json()) as Mail[]).find((m) => m.text.includes(run.jobNumber) && m.text.includes("Pull from the delivery"));
      if (!mail) await new Promise((r) => setTimeout(r, 100));
    }
    expect(mail?.to.map((t) => t.address)).toContain(run.actors.qa.email);
    expect(mail?.text).toContain("Pull from the delivery: sheets 101 to 199 (99 sheets).");
    expect(mail?.text).toContain(`/jobs/${run.jobId}/run`);
  });
});

describe("the CSV export", () => {
  let text: string;
  beforeAll(async () => {
    actor = run.actors.customer;
    const response = await getCsv(new Request(`http://127.0.0.1/api/v1/jobs/${run.jobId}/run/sheets.csv`), params());
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("text/csv; charset=utf-8; header=present");
    expect(response.headers.get("content-disposition")).toMatch(/^attachment; filename="RUN-[0-9a-f]{8}-r1-sheets\.csv"$/);
    text = new TextDecoder("utf-8", { fatal: true }).decode(await response.arrayBuffer());
  });

  it("has the header row and one record per sheet, each ending in CRLF", () => {
    const records = readRfc4180(text);
    expect(records[0]).toEqual([...CSV_HEADER]);
    expect(records).toHaveLength(6);
    expect(text.endsWith("\r\n")).toBe(true);
    // Every line break outside a quoted field is CRLF.
    expect(text.replace(/"(?:[^"]|"")*"/g, "").match(/\r?\n/g)?.every((b) => b === "\r\n")).toBe(true);
    expect(records.every((r) => r.length === CSV_HEADER.length)).toBe(true);
  });

  it("quotes the field holding a comma, quotes and a line break, doubling the quotes", () => {
    expect(text).toContain('"sheet ""300"", left\r\nhalf.png"');
    const records = readRfc4180(text);
    expect(records.find((r) => r[0] === "300")?.[1]).toBe(tricky);
  });

  it("carries the figures: sheet 150 failed with its span, the passed sheets signed", () => {
    const rows = readRfc4180(text).slice(1);
    const byNumber = new Map(rows.map((r) => [r[0], r]));
    expect(byNumber.get("150")).toEqual([
      "150",
      "sheet-150.png",
      expect.stringMatching(/^[0-9a-f]{64}$/),
      expect.stringMatching(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/),
      "1",
      "1",
      "failed",
      run.actors.reviewer.name,
      expect.stringMatching(/Z$/),
      "sheets 101 to 199",
    ]);
    expect(byNumber.get("100")?.[6]).toBe("passed");
    expect(byNumber.get("250")?.slice(6)).toEqual(["pending", "", "", ""]);
  });

  it("keeps spreadsheet formulas inert (OWASP, CSV Injection)", () => {
    expect(inert("=HYPERLINK(1)")).toBe("'=HYPERLINK(1)");
    expect(inert("-2+3")).toBe("'-2+3");
    expect(inert("sheet-1.png")).toBe("sheet-1.png");
  });
});

describe("sheet numbers are unique in a run", () => {
  const png = () => sharp({ create: { width: 64, height: 40, channels: 3, background: { r: 250, g: 248, b: 240 } } }).png().toBuffer();
  const storedScans = async () => ({ rows: (await db.select().from(scans).where(eq(scans.jobId, run.jobId))).length, objects: (await listKeys("scans/")).length });

  it("a new file with a number the run has is refused with 409, naming the sheet it repeats; nothing is stored", async () => {
    actor = run.actors.qa;
    const before = await storedScans();
    const response = await postScans(multipart([{ name: "pull-150.png", data: await png() }], { sheetNumber: "150" }), params());
    expect(response.status).toBe(409);
    const body = await response.json();
    expect(body.error.code).toBe("repeated_sheet_number");
    expect(body.error.message).toContain("repeats sheet 150");
    expect(body.error.message).toContain("sheet-150.png");
    expect(await storedScans()).toEqual(before);
  });

  it("two files of one upload with the same number are refused with 422; nothing is stored", async () => {
    const before = await storedScans();
    const [a, b] = [await png(), Buffer.concat([await png(), Buffer.from([0])])];
    const response = await postScans(multipart([{ name: "sheet-0401.png", data: a }, { name: "sheet-401-again.png", data: b }]), params());
    expect(response.status).toBe(422);
    expect((await response.json()).error.message).toContain("both carry sheet number 401");
    expect(await storedScans()).toEqual(before);
    expect(await db.select().from(scans).where(and(eq(scans.jobId, run.jobId), eq(scans.sheetNumber, 401)))).toHaveLength(0);
  });
});
