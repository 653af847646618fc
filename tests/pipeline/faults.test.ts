// Fault tests against the real services: a worker killed mid-inspection, Redis restarted under an idle worker,
// storage going away in the middle of an upload.
import "./support/test-env";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db/client";
import { artworkRevisions, findings, inspections, jobs, scans } from "@/db/schema";
import { saveInspectionResult, countFindings } from "@/lib/pipeline/records";
import { approveArtwork, uploadArtwork } from "@/lib/pipeline/artworks";
import { uploadScans } from "@/lib/pipeline/scans";
import { closeQueues } from "@/lib/queue/queues";
import type { InspectionResult } from "@/lib/imaging/types";
import { listKeys } from "@/storage/objects";
import { ensureBucket } from "@/storage/objects";
import sharp from "sharp";
import { cartonArtwork, perfectScanPng } from "./support/artwork";
import { makeFixture, multipart, until, type Fixture } from "./support/fixtures";
import { startMissingServices, stopService } from "./support/services";
import { emptyQueues, maildev, startWorker, type WorkerProcess } from "./support/worker-process";

let fx: Fixture;
let scanPng: Buffer;
let worker: WorkerProcess | undefined;

async function statusOf(inspectionId: number) {
  const [row] = await db.select().from(inspections).where(eq(inspections.id, inspectionId));
  return row;
}
async function uploadOne(name: string, data: Uint8Array) {
  const { items } = await uploadScans(fx.actors.qa, fx.jobId, multipart([{ name, data }]));
  return items[0];
}
const done = (id: number, timeoutMs = 180_000) =>
  until(`inspection ${id} finished`, async () => {
    const row = await statusOf(id);
    return row.status === "done" || row.status === "failed" ? row : null;
  }, timeoutMs);

describe("pipeline faults", () => {
  beforeAll(async () => {
    await ensureBucket();
    await emptyQueues();
    fx = await makeFixture({ rows: 2, columns: 3 });
    await db.update(jobs).set({ artworkDpi: 300 }).where(eq(jobs.id, fx.jobId));
    const { pdf } = await cartonArtwork({ widthMm: 297, heightMm: 210, rows: 2, columns: 3 });
    const art = await uploadArtwork(fx.actors.prepress, fx.jobId, multipart([{ name: "sheet.pdf", data: pdf }]));
    await approveArtwork(fx.actors.prepress, art.revisionId);
    const dot = Buffer.from(`<svg width="60" height="60"><circle cx="30" cy="30" r="12" fill="#202020"/></svg>`);
    scanPng = await sharp(await perfectScanPng(pdf, 300)).composite([{ input: dot, left: 900, top: 700 }]).png().toBuffer();
    worker = startWorker();
    await worker.waitFor(/worker ready/);
    await until("raster", async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, art.revisionId));
      return r.rasterStatus === "ready";
    });
  });
  afterAll(async () => {
    await worker?.stop("SIGTERM");
    startMissingServices();
    await closeQueues();
  });

  it("a worker killed with SIGKILL mid-inspection: after a restart the inspection completes once, findings not duplicated", async () => {
    const item = await uploadOne("sheet-0500.png", scanPng);
    const id = item.inspectionId!;
    const running = await until("inspection running", async () => {
      const row = await statusOf(id);
      return row.status === "running" && row.progressPercent >= 8 ? row : null;
    }, 60_000, 50);
    expect(running.status).toBe("running");
    await worker!.stop("SIGKILL");
    expect(worker!.child.signalCode).toBe("SIGKILL");
    expect((await statusOf(id)).status).toBe("running");

    worker = startWorker();
    await worker.waitFor(/worker ready/);
    const finished = await done(id);
    expect(finished.status).toBe("done");
    // Started twice (the killed run and the recovered one), finished once.
    expect(finished.attempts).toBe(2);
    const rows = await db.select().from(findings).where(eq(findings.inspectionId, id));
    expect(rows.length).toBeGreaterThanOrEqual(1);
    const cropKeys = await listKeys(`crops/${id}/`);
    expect(cropKeys.length).toBe(rows.filter((r) => r.cropScanKey).length * 3);
    const mails = await until("one ready e-mail", async () => {
      const found = (await maildev.messages()).filter((m) => m.subject.includes("sheet 500") && m.subject.includes(`P-`) && m.text.includes(`#inspection-${id}`));
      return found.length > 0 ? found : null;
    });
    expect(mails).toHaveLength(1);
  });

  it("saving an inspection's result twice replaces its findings instead of adding to them", async () => {
    const item = await uploadOne("sheet-0501.png", await sharp(scanPng).png({ compressionLevel: 2 }).toBuffer());
    const id = item.inspectionId!;
    await done(id);
    const n = await countFindings(id);
    const fake: InspectionResult = {
      alignment: { rotationDeg: 0, scale: 1, txMm: 0, tyMm: 0, residualPx: 0, residualMm: 0, correlation: 1, artworkToScan: [1, 0, 0, 0, 1, 0], coveredMm: { x: 0, y: 0, w: 10, h: 10 } },
      coveredMm: { x: 0, y: 0, w: 10, h: 10 },
      drift: { deltaE00: 0 },
      findings: [{ xMm: 1, yMm: 1, wMm: 1, hMm: 1, areaMm2: 1, kind: "extra_ink", deltaE00Mean: 9, deltaE00Max: 12, up: 1 }],
      timingsMs: {},
      passesMs: {},
    };
    await saveInspectionResult(id, fake, [null]);
    await saveInspectionResult(id, fake, [null]);
    expect(await countFindings(id)).toBe(1);
    expect(n).toBeGreaterThanOrEqual(1);
  });

  it("Redis restarted while the worker is idle: the worker reconnects and takes the next job", async () => {
    await stopService("redis");
    await new Promise((r) => setTimeout(r, 1500));
    startMissingServices();
    // A restarted Redis is empty (no persistence in tests): the worker must reconnect and listen again.
    const item = await until("upload after Redis restart", async () => {
      try {
        return await uploadOne("sheet-0502.png", await sharp(scanPng).png({ compressionLevel: 4 }).toBuffer());
      } catch {
        return null;
      }
    }, 30_000, 500);
    // Well inside the minute of the worker's sweep: the job went through the queue, not the sweep.
    const finished = await done(item.inspectionId!, 30_000);
    expect(finished.status).toBe("done");
    expect(worker!.child.exitCode).toBeNull();
  });

  it("the mail fake down: the inspection still completes, and the e-mail follows once mail is back", async () => {
    await stopService("maildev");
    try {
      const item = await uploadOne("sheet-0503.png", await sharp(scanPng).png({ compressionLevel: 5 }).toBuffer());
      const finished = await done(item.inspectionId!, 60_000);
      expect(finished.status).toBe("done");
      await worker!.waitFor(/mail mail-sheet_ready-\d+-\d+: not sent yet/, 30_000);
    } finally {
      startMissingServices();
    }
    // The mail queue retries with exponential backoff (10 s, 20 s, …).
    const mail = await until("e-mail after the outage", async () =>
      (await maildev.messages()).find((m) => m.subject.includes("sheet 503") && m.subject.includes("P-")), 90_000, 1000);
    expect(mail.subject).toMatch(/^Ready for review/);
  });

  it("storage goes down in the middle of an upload: a clean error, no row, no object", async () => {
    const before = (await db.select().from(scans).where(eq(scans.jobId, fx.jobId))).length;
    const keysBefore = new Set(await listKeys("scans/"));
    const boundary = "----tympan-fault-test";
    const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="sheet-0600.png"\r\nContent-Type: image/png\r\n\r\n`);
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    const png = await sharp(scanPng).png({ compressionLevel: 0 }).toBuffer(); // large: several multipart parts
    let sent = 0;
    let stopped = false;
    const body = new ReadableStream<Uint8Array>({
      async pull(controller) {
        if (sent === 0) controller.enqueue(head);
        if (sent >= png.length) {
          controller.enqueue(tail);
          controller.close();
          return;
        }
        const chunk = png.subarray(sent, sent + 1024 * 1024);
        sent += chunk.length;
        controller.enqueue(chunk);
        if (!stopped && sent > 12 * 1024 * 1024) {
          stopped = true;
          await stopService("s3rver");
        }
        await new Promise((r) => setTimeout(r, 20));
      },
    });
    expect(png.length).toBeGreaterThan(20 * 1024 * 1024);
    const request = new Request("http://127.0.0.1/upload", {
      method: "POST",
      body,
      headers: { "content-type": `multipart/form-data; boundary=${boundary}` },
      duplex: "half",
    } as RequestInit);
    const error = await uploadScans(fx.actors.qa, fx.jobId, request).then(() => null, (e) => e);
    expect(stopped).toBe(true);
    expect(error).toMatchObject({ status: 503, code: "storage_unavailable" });
    expect(error.message).toMatch(/nothing was saved/);
    startMissingServices();
    expect((await db.select().from(scans).where(eq(scans.jobId, fx.jobId))).length).toBe(before);
    const added = (await listKeys("scans/")).filter((k) => !keysBefore.has(k));
    expect(added).toEqual([]);
  });
});
