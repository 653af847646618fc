// The PDF reports, read back with pdfjs-dist (Mozilla's PDF reader, an independent implementation of ISO 32000):
// the text must be real, searchable text holding the job number, sheet numbers, both sha256 hashes, the decisions
// with their comments, the signature's meaning and record hash, the span to pull and the cautions. A customer
// user gets their own reports; another customer's is a 404 that names nothing of the job.
import "../pipeline/support/test-env";
import { mkdirSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import * as pdfjs from "pdfjs-dist/legacy/build/pdf.mjs";
import sharp from "sharp";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb, db } from "@/db/client";
import { artworkRevisions, findings, scans, sheetSignoffs } from "@/db/schema";
import type { Actor } from "@/lib/auth/policy";
import { closeQueues } from "@/lib/queue/queues";
import { decideFinding } from "@/lib/review/decisions";
import { signSheet } from "@/lib/review/signoff";
import { ensureBucket, putObject } from "@/storage/objects";
import { makeRun, PASSWORD, type RunFixture } from "../run/support";

let actor: Actor;
vi.mock("@/lib/auth/request-actor", () => ({ requestActor: async () => actor }));
const { GET: sheetPdf } = await import("@/app/api/v1/inspections/[inspectionId]/report.pdf/route");
const { GET: runPdf } = await import("@/app/api/v1/jobs/[jobId]/run/report.pdf/route");

/** Reports land in test-results/ for people to look at. */
const artifact = (name: string) => {
  mkdirSync("test-results", { recursive: true });
  return path.join("test-results", name);
};
const pdfjsDir = path.dirname(createRequire(import.meta.url).resolve("pdfjs-dist/package.json"));
let run: RunFixture;
const sheet = (n: number) => run.sheets.find((s) => s.sheetNumber === n)!;
const COMMENT = "Magenta hickey on the lid flap — “comet” shape, ΔE00 well above the limit";

async function pdfText(bytes: Uint8Array): Promise<{ text: string; pages: number }> {
  const doc = await pdfjs.getDocument({ data: bytes, standardFontDataUrl: path.join(pdfjsDir, "standard_fonts") + path.sep, cMapUrl: path.join(pdfjsDir, "cmaps") + path.sep, wasmUrl: path.join(pdfjsDir, "wasm") + path.sep }).promise;
  const parts: string[] = [];
  for (let p = 1; p <= doc.numPages; p++) {
    const content = await (await doc.getPage(p)).getTextContent();
    parts.push(content.items.map((item) => ("str" in item ? item.str : "")).join("\n"));
  }
  await doc.destroy();
  return { text: parts.join("\n"), pages: doc.numPages };
}

type Handler = (request: Request, ctx: { params: Promise<never> }) => Promise<Response>;

async function fetchPdf(handler: Handler, params: Record<string, string>) {
  const response = await handler(new Request("http://127.0.0.1/report.pdf"), { params: Promise.resolve(params as never) });
  return response;
}

beforeAll(async () => {
  await ensureBucket();
  run = await makeRun([
    { sheetNumber: 500, drift: 1.0 },
    { sheetNumber: 520, drift: 3.6, findings: [[40_000, 30_000, 1], [150_000, 60_000, 2]] },
    { sheetNumber: 540, drift: 1.2 },
  ]);
  // Close-ups in storage, as the worker leaves them.
  const crop = await sharp({ create: { width: 48, height: 48, channels: 3, background: { r: 200, g: 40, b: 120 } } }).png().toBuffer();
  for (const id of sheet(520).findingIds) {
    const keys = ["artwork", "scan", "difference"].map((k) => `crops/${run.tag}/${id}-${k}.png`);
    for (const key of keys) await putObject(key, crop, "image/png");
    await db.update(findings).set({ cropArtworkKey: keys[0], cropScanKey: keys[1], cropDifferenceKey: keys[2] }).where(eq(findings.id, id));
  }
  const reviewer = run.actors.reviewer;
  const [a, b] = sheet(520).findingIds;
  await decideFinding(reviewer, { inspectionId: sheet(520).inspectionId, findingId: a, version: 0, decision: "rejected", reason: "defect", comment: COMMENT });
  await decideFinding(reviewer, { inspectionId: sheet(520).inspectionId, findingId: b, version: 0, decision: "accepted", reason: "within_tolerance" });
  await signSheet(reviewer, { inspectionId: sheet(520).inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD });
  for (const n of [500, 540]) await signSheet(reviewer, { inspectionId: sheet(n).inspectionId, verdict: "passed", meaning: "approved_for_release", password: PASSWORD });
}, 60_000);
afterAll(async () => {
  await closeQueues();
  await closeDb();
});

describe("the sheet report", () => {
  it("is a PDF whose text holds the job, sheet, both hashes, each finding's decision and comment, the signature and the cautions", async () => {
    actor = run.actors.customer;
    const response = await fetchPdf(sheetPdf as Handler, { inspectionId: String(sheet(520).inspectionId) });
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("application/pdf");
    const bytes = new Uint8Array(await response.arrayBuffer());
    expect(new TextDecoder().decode(bytes.slice(0, 5))).toBe("%PDF-");
    writeFileSync(artifact("sheet-report.pdf"), bytes);
    const { text } = await pdfText(bytes);
    const [scan] = await db.select().from(scans).where(eq(scans.id, sheet(520).scanId));
    const [revision] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, run.revisionId));
    const [signoff] = await db.select().from(sheetSignoffs).where(eq(sheetSignoffs.inspectionId, sheet(520).inspectionId));
    const flat = text.replace(/\n/g, " ");
    expect(flat).toContain(run.jobNumber);
    expect(flat).toContain("Sheet 520");
    expect(flat).toContain(revision.sourceSha256);
    expect(flat).toContain(scan.sha256);
    expect(flat).toContain(signoff.recordSha256);
    expect(flat).toContain("Rejected (defect)");
    expect(flat).toContain("Accepted (within tolerance)");
    expect(flat).toContain("“comet” shape, ΔE00 well above the limit");
    expect(flat).toContain("Rejected · verdict failed");
    expect(flat).toContain("a spectrophotometer decides on colour");
    expect(flat).toContain("Sign-off stays with qualified staff under the customer's and the regulator's rules");
  });

  it("another customer's user gets 404, naming nothing of the job", async () => {
    actor = run.actors.otherCustomer;
    const response = await fetchPdf(sheetPdf as Handler, { inspectionId: String(sheet(520).inspectionId) });
    expect(response.status).toBe(404);
    expect(await response.text()).not.toContain(run.jobNumber);
  });
});

describe("the run report", () => {
  it("holds the traceability table, the span to pull, the chart's legend and each signed sheet with its record hash", async () => {
    actor = run.actors.qa;
    const response = await fetchPdf(runPdf as Handler, { jobId: String(run.jobId) });
    expect(response.status).toBe(200);
    const bytes = new Uint8Array(await response.arrayBuffer());
    writeFileSync(artifact("run-report.pdf"), bytes);
    const { text } = await pdfText(bytes);
    const flat = text.replace(/\n/g, " ");
    expect(flat).toContain(run.jobNumber);
    expect(flat).toContain("3 of 400 sheets, about one in 133");
    expect(flat).toContain("Pull sheets 501 to 539 (39 sheets)");
    expect(flat).toContain("limit ΔE00 4");
    const signoffs = await db.select().from(sheetSignoffs);
    for (const n of [500, 520, 540]) {
      const own = signoffs.find((s) => s.inspectionId === sheet(n).inspectionId)!;
      expect(flat).toContain(`Sheet ${n}: ${n === 520 ? "FAILED" : "PASSED"}`);
      expect(flat).toContain(own.recordSha256);
    }
  });

  it("another customer's user gets 404", async () => {
    actor = run.actors.otherCustomer;
    expect((await fetchPdf(runPdf as Handler, { jobId: String(run.jobId) })).status).toBe(404);
  });
});
