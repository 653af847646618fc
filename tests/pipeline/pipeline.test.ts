// Upload → rasterise → inspect → findings stored → e-mail, through the real route handlers (with a stubbed
// session), the real worker process, MariaDB, Redis, the S3 fake and the mail fake.
import "./support/test-env";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { PDFDocument } from "pdf-lib";
import { db } from "@/db/client";
import { artworkRevisions, findings, inspections, jobs, scans } from "@/db/schema";
import type { Actor } from "@/lib/auth/policy";
import { deserialisePrepared } from "@/lib/imaging/compare/prepared-store";
import { ensureBucket, getObjectBuffer, listKeys } from "@/storage/objects";
import { cartonArtwork, perfectScanPng } from "./support/artwork";
import { makeFixture, multipart, until, type Fixture } from "./support/fixtures";
import { pngHeaderClaiming } from "./support/files";
import { emptyQueues, maildev, startWorker, type WorkerProcess } from "./support/worker-process";

let actor: Actor;
vi.mock("@/lib/auth/request-actor", () => ({ requestActor: async () => actor }));
const { POST: postArtwork } = await import("@/app/api/jobs/[jobId]/artworks/route");
const { POST: postScans } = await import("@/app/api/jobs/[jobId]/scans/route");
const { GET: getPipeline } = await import("@/app/api/jobs/[jobId]/pipeline/route");
const { POST: approve } = await import("@/app/api/artworks/[revisionId]/approve/route");
const { POST: retry } = await import("@/app/api/inspections/[inspectionId]/retry/route");
const { GET: getCrop } = await import("@/app/api/inspections/[inspectionId]/findings/[findingId]/crops/[kind]/route");

const DPI = 150;
let fx: Fixture;
let worker: WorkerProcess;
let pdf: Uint8Array;
let cleanScan: Buffer;
const as = (a: Actor) => (actor = a);
const params = <T>(p: T) => ({ params: Promise.resolve(p) });
const jobParams = () => params({ jobId: String(fx.jobId) });

async function uploadScan(name: string, data: Uint8Array, fields: Record<string, string> = {}) {
  const res = await postScans(multipart([{ name, data }], fields), jobParams());
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- test reads whatever JSON the route sent
  return { status: res.status, body: (await res.json()) as any };
}
const inspectionOf = (scanId: number) => db.select().from(inspections).where(eq(inspections.scanId, scanId)).then((r) => r[0]);
const finished = (scanId: number) =>
  until(`inspection of scan ${scanId}`, async () => {
    const i = await inspectionOf(scanId);
    return i && (i.status === "done" || i.status === "failed") ? i : null;
  });

describe("the inspection pipeline, end to end", () => {
  beforeAll(async () => {
    await ensureBucket();
    await emptyQueues();
    fx = await makeFixture({ rows: 1, columns: 2 });
    await db.update(jobs).set({ artworkDpi: DPI }).where(eq(jobs.id, fx.jobId));
    ({ pdf } = await cartonArtwork({ rows: 1, columns: 2 }));
    cleanScan = await perfectScanPng(pdf, DPI);
    worker = startWorker();
    await worker.waitFor(/worker ready/);
  });
  afterAll(async () => {
    await worker?.stop("SIGTERM");
  });

  let revisionId: number;
  it("prepress uploads the artwork PDF; the same file again is recognised, not stored twice", async () => {
    as(fx.actors.prepress);
    const res = await postArtwork(multipart([{ name: "oats-carton.pdf", data: pdf }]), jobParams());
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ revision: 1, duplicate: false });
    revisionId = body.revisionId;
    const again = await postArtwork(multipart([{ name: "copy of oats-carton.pdf", data: pdf }]), jobParams());
    expect(again.status).toBe(200);
    expect(await again.json()).toMatchObject({ revisionId, duplicate: true });
    expect(await db.select().from(artworkRevisions).where(eq(artworkRevisions.jobId, fx.jobId))).toHaveLength(1);
  });

  it("QA may not approve artwork; prepress approves and the worker rasterises it once", async () => {
    as(fx.actors.qa);
    expect((await approve(new Request("http://x/"), params({ revisionId: String(revisionId) }))).status).toBe(403);
    as(fx.actors.prepress);
    expect((await approve(new Request("http://x/"), params({ revisionId: String(revisionId) }))).status).toBe(200);
    const revision = await until("raster", async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId));
      return r.rasterStatus === "ready" ? r : null;
    });
    expect(revision.rasterKeys?.[0]).toMatch(new RegExp(`^rasters/[0-9a-f-]{36}/${DPI}\\.png$`));
    expect(revision.pageWidthUm).toBe(210_000);
    expect(revision.pageHeightUm).toBe(148_000);
  });

  it("the raster job also prepares the artwork's side of the comparison and stores it in the bucket", async () => {
    const revision = await until("prepared artwork", async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId));
      return r.preparedKey ? r : null;
    });
    expect(revision.preparedKey).toMatch(new RegExp(`^prepared/[0-9a-f-]{36}/${DPI}/blur[\\d.]+-sigma[\\d.]+-r\\d+-reach\\d+\\.bin$`));
    const bytes = new Uint8Array(await getObjectBuffer(revision.preparedKey!));
    const header = JSON.parse(new TextDecoder().decode(bytes.subarray(12, 12 + new DataView(bytes.buffer, bytes.byteOffset).getUint32(8, true))));
    const raster = await sharp(await getObjectBuffer(revision.rasterKeys![0])).metadata();
    const page = await deserialisePrepared(bytes, { width: raster.width!, height: raster.height!, windows: header.windows });
    expect(page.rect).toEqual({ x: 0, y: 0, w: raster.width, h: raster.height });
  });

  let cleanScanId: number;
  it("QA uploads a clean sheet; it is inspected, its stage reaches done and reviewers are e-mailed", async () => {
    as(fx.actors.customer);
    expect((await uploadScan("sheet-0217.png", cleanScan)).status).toBe(403);
    as(fx.actors.qa);
    const up = await uploadScan("sheet-0217.png", cleanScan);
    expect(up.status).toBe(201);
    expect(up.body.items[0]).toMatchObject({ sheetNumber: 217, duplicate: false });
    cleanScanId = up.body.items[0].scanId;
    const inspection = await finished(cleanScanId);
    expect(inspection).toMatchObject({ status: "done", stage: "done", progressPercent: 100 });
    const [scan] = await db.select().from(scans).where(eq(scans.id, cleanScanId));
    expect(scan.dpi).toBe(DPI);
    const view = await (await getPipeline(new Request("http://x/"), jobParams())).json();
    expect(view.sheets[0]).toMatchObject({ sheetNumber: 217, inspection: { status: "done", findingsCount: 0 } });
    const mail = await until("ready e-mail", async () =>
      (await maildev.messages()).find((m) => m.subject.includes(`P-`) && m.subject.includes("sheet 217") && m.to.some((t) => t.address === fx.actors.reviewer.email)),
    );
    expect(mail.subject).toMatch(/^Ready for review/);
    expect(mail.text).toContain(`/jobs/${fx.jobId}`);
  });

  it("the same scan uploaded again is recognised and not stored twice", async () => {
    const up = await uploadScan("sheet-217-again.png", cleanScan);
    expect(up.status).toBe(200);
    expect(up.body.items[0]).toMatchObject({ duplicate: true, scanId: cleanScanId });
    expect(up.body.items[0].message).toMatch(/Already uploaded as sheet 217/);
    expect(await db.select().from(scans).where(eq(scans.jobId, fx.jobId))).toHaveLength(1);
  });

  it("a sheet with an ink dot gets findings, with crops in storage served through the policy-checked route", async () => {
    const dot = Buffer.from(`<svg width="40" height="40"><circle cx="20" cy="20" r="6" fill="#1a1a1a"/></svg>`);
    const spotted = await sharp(cleanScan).composite([{ input: dot, left: 300, top: 250 }]).png().toBuffer();
    const up = await uploadScan("whatever.png", spotted, { sheetNumber: "218" });
    expect(up.body.items[0]).toMatchObject({ sheetNumber: 218 });
    const inspection = await finished(up.body.items[0].scanId);
    expect(inspection.status).toBe("done");
    const rows = await db.select().from(findings).where(eq(findings.inspectionId, inspection.id));
    expect(rows.length).toBeGreaterThanOrEqual(1);
    expect(rows.some((f) => f.kind === "extra_ink")).toBe(true);
    const f = rows[0];
    expect(f.cropScanKey).toMatch(new RegExp(`^crops/${inspection.id}/`));
    expect((await listKeys(`crops/${inspection.id}/`)).length).toBe(rows.filter((r) => r.cropScanKey).length * 3);
    const crop = await getCrop(new Request("http://x/"), params({ inspectionId: String(inspection.id), findingId: String(f.id), kind: "scan" }));
    expect(crop.status).toBe(200);
    expect(crop.headers.get("content-type")).toBe("image/png");
    const png = Buffer.from(await crop.arrayBuffer());
    expect((await sharp(png).metadata()).format).toBe("png");
    as(fx.actors.customer); // the customer's own job: may read
    expect((await getCrop(new Request("http://x/"), params({ inspectionId: String(inspection.id), findingId: String(f.id), kind: "artwork" }))).status).toBe(200);
    as(fx.actors.qa);
  });

  it("bad files are refused with clear errors and nothing stored; the worker keeps running", async () => {
    const before = (await db.select().from(scans).where(eq(scans.jobId, fx.jobId))).length;
    const text = await uploadScan("sheet-0300.tif", Buffer.from("This is a note, not a scan.\n"));
    expect([text.status, text.body.error.code]).toEqual([415, "unsupported_type"]);
    expect(text.body.error.message).toMatch(/not a TIFF, PNG or JPEG/);
    const empty = await uploadScan("sheet-0301.tif", Buffer.alloc(0));
    expect([empty.status, empty.body.error.code]).toEqual([400, "empty_file"]);
    const bomb = await uploadScan("sheet-0302.png", pngHeaderClaiming(100_000, 100_000));
    expect([bomb.status, bomb.body.error.code]).toEqual([422, "image_too_large"]);

    as(fx.actors.prepress);
    const doc = await PDFDocument.create();
    doc.addPage([300, 300]);
    const whole = await doc.save();
    const truncated = await postArtwork(multipart([{ name: "cut.pdf", data: whole.subarray(0, whole.length - 40) }]), jobParams());
    const truncatedBody = await truncated.json();
    as(fx.actors.qa);
    expect([truncated.status, truncatedBody.error.code]).toEqual([422, "pdf_truncated"]);
    as(fx.actors.prepress);
    doc.addJavaScript("greet", "app.alert('hello');");
    const scripted = await postArtwork(multipart([{ name: "scripted.pdf", data: await doc.save({ useObjectStreams: false }) }]), jobParams());
    const scriptedBody = await scripted.json();
    as(fx.actors.qa);
    expect([scripted.status, scriptedBody.error.code]).toEqual([422, "pdf_has_script"]);
    expect(scriptedBody.error.message).toMatch(/contains JavaScript/);
    expect((await db.select().from(scans).where(eq(scans.jobId, fx.jobId))).length).toBe(before);
    expect(await db.select().from(artworkRevisions).where(eq(artworkRevisions.jobId, fx.jobId))).toHaveLength(1);
    expect(worker.child.exitCode).toBeNull();
  });

  it("a file that looks like a TIFF but cannot be decoded fails in plain words, once, and QA can retry it", async () => {
    const fake = Buffer.concat([Buffer.from([0x49, 0x49, 42, 0]), Buffer.from("garbage that is no image directory at all")]);
    const up = await uploadScan("sheet-0400.tif", fake);
    expect(up.status).toBe(201);
    const inspection = await finished(up.body.items[0].scanId);
    expect(inspection).toMatchObject({ status: "failed", errorCode: "scan_unreadable", attempts: 1 });
    expect(inspection.errorMessage).toMatch(/cannot be read/);
    const mail = await until("failed e-mail", async () =>
      (await maildev.messages()).find((m) => m.subject.startsWith("Sheet needs attention") && m.subject.includes("sheet 400") && m.to.some((t) => t.address === fx.actors.qa.email)),
    );
    expect(mail.to.map((t) => t.address)).toContain(fx.actors.prepress.email);

    as(fx.actors.reviewer);
    expect((await retry(new Request("http://x/"), params({ inspectionId: String(inspection.id) }))).status).toBe(403);
    as(fx.actors.qa);
    expect((await retry(new Request("http://x/"), params({ inspectionId: String(inspection.id) }))).status).toBe(200);
    const again = await until("second failure", async () => {
      const i = await inspectionOf(up.body.items[0].scanId);
      return i.status === "failed" && i.attempts === 2 ? i : null;
    });
    expect(again.errorCode).toBe("scan_unreadable");
    // And the worker still takes good work afterwards.
    const spotless = await sharp(cleanScan).png({ compressionLevel: 1 }).toBuffer();
    const next = await uploadScan("sheet-0401.png", spotless);
    expect((await finished(next.body.items[0].scanId)).status).toBe("done");
  });
});
