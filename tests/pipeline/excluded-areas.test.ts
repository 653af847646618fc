// Excluded areas (variable data): the "up" scope repeats in every up of the revision's grid, areas are checked
// against the page, locked once the revision is approved, and the worker passes them to the engine, so an ink
// dot inside one gives no finding while the same dot without the area does.
import "./support/test-env";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { db } from "@/db/client";
import { artworkRevisions, findings, inspections, jobs } from "@/db/schema";
import type { Actor } from "@/lib/auth/policy";
import { AppError } from "@/lib/errors";
import { inspectSheet } from "@/lib/imaging/inspect";
import { loadScan } from "@/lib/imaging/scan/load-scan";
import { getProfile } from "@/lib/imaging/profiles";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import { expandExcludedAreas } from "@/lib/pipeline/excluded-areas";
import { setExcludedAreas } from "@/lib/pipeline/artworks";
import { ensureBucket } from "@/storage/objects";
import { cartonArtwork, perfectScanPng } from "./support/artwork";
import { makeFixture, multipart, until, type Fixture } from "./support/fixtures";
import { emptyQueues, startWorker, type WorkerProcess } from "./support/worker-process";

let actor: Actor;
vi.mock("@/lib/auth/request-actor", () => ({ requestActor: async () => actor }));
const { POST: postArtwork } = await import("@/app/api/jobs/[jobId]/artworks/route");
const { POST: postScans } = await import("@/app/api/jobs/[jobId]/scans/route");
const { POST: approve } = await import("@/app/api/artworks/[revisionId]/approve/route");
const { GET: getPreview } = await import("@/app/api/artworks/[revisionId]/preview/route");
const { PUT: putAreas } = await import("@/app/api/artworks/[revisionId]/excluded-areas/route");

const DPI = 150;
const params = <T>(p: T) => ({ params: Promise.resolve(p) });

describe("expanding excluded areas", () => {
  it("repeats an up area in every up, row by row, inside the ups' area; a sheet area stays as it is", () => {
    const areas = [
      { scope: "up" as const, label: "lot", x: 5, y: 10, w: 20, h: 4 },
      { scope: "sheet" as const, label: "sheet number", x: 1, y: 2, w: 30, h: 5 },
    ];
    const rects = expandExcludedAreas(areas, { rows: 2, columns: 3, areaMm: { x: 10, y: 20, w: 300, h: 200 } }, { widthMm: 320, heightMm: 240 });
    // Each up is 100 × 100 mm from (10, 20).
    expect(rects).toEqual([
      { x: 15, y: 30, w: 20, h: 4 },
      { x: 115, y: 30, w: 20, h: 4 },
      { x: 215, y: 30, w: 20, h: 4 },
      { x: 15, y: 130, w: 20, h: 4 },
      { x: 115, y: 130, w: 20, h: 4 },
      { x: 215, y: 130, w: 20, h: 4 },
      { x: 1, y: 2, w: 30, h: 5 },
    ]);
  });
});

describe("excluded areas through the worker", () => {
  let fx: Fixture;
  let worker: WorkerProcess;
  let pdf: Uint8Array;
  let spotted: Buffer;
  let revisionId: number;
  const as = (a: Actor) => (actor = a);
  // An ink dot in each up at the same place in the up (1x2 ups on a 210 × 148 mm page: each up 105 mm wide).
  const dotCentreMm = { x: 54.2, y: 45.7 };
  const areaInUp = { scope: "up" as const, label: "lot and expiry", x: dotCentreMm.x - 6, y: dotCentreMm.y - 6, w: 12, h: 12 };

  beforeAll(async () => {
    await ensureBucket();
    await emptyQueues();
    fx = await makeFixture({ rows: 1, columns: 2 });
    ({ pdf } = await cartonArtwork({ rows: 1, columns: 2 }));
    const clean = await perfectScanPng(pdf, DPI);
    const dot = Buffer.from(`<svg width="40" height="40"><circle cx="20" cy="20" r="6" fill="#1a1a1a"/></svg>`);
    const px = (mm: number) => Math.round((mm * DPI) / 25.4) - 20;
    spotted = await sharp(clean)
      .composite([
        { input: dot, left: px(dotCentreMm.x), top: px(dotCentreMm.y) },
        { input: dot, left: px(dotCentreMm.x + 105), top: px(dotCentreMm.y) },
      ])
      .png()
      .toBuffer();
    await db.update(jobs).set({ artworkDpi: DPI }).where(eq(jobs.id, fx.jobId));
    worker = startWorker();
    await worker.waitFor(/worker ready/);
  });
  afterAll(async () => {
    await worker?.stop("SIGTERM");
  });

  it("the same dots without an excluded area are findings in both ups (the engine alone)", async () => {
    const page = await rasterisePage(pdf, { dpi: DPI });
    const scan = await loadScan(new Uint8Array(spotted), { dpi: DPI });
    const result = await inspectSheet({ artwork: page, scan, profile: getProfile("strict-pharma"), ups: { rows: 1, columns: 2 } });
    expect(new Set(result.findings.map((f) => f.up))).toEqual(new Set([1, 2]));
  });

  it("prepress uploads a draft; the worker makes its page picture, served to whoever may read the job", async () => {
    as(fx.actors.prepress);
    const res = await postArtwork(multipart([{ name: "oats-variable-data.pdf", data: pdf }]), params({ jobId: String(fx.jobId) }));
    expect(res.status).toBe(201);
    revisionId = (await res.json()).revisionId;
    const drawn = await until("page size from the preview", async () => {
      const [r] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId));
      return r.pageWidthUm > 0 ? r : null;
    });
    expect([drawn.pageWidthUm, drawn.pageHeightUm, drawn.status, drawn.rasterStatus]).toEqual([210_000, 148_000, "draft", "none"]);
    const preview = await until("preview image", async () => {
      const r = await getPreview(new Request("http://x/"), params({ revisionId: String(revisionId) }));
      return r.status === 200 ? r : null;
    });
    expect(preview.headers.get("content-type")).toBe("image/png");
    const meta = await sharp(Buffer.from(await preview.arrayBuffer())).metadata();
    expect(meta.width).toBeLessThanOrEqual(2000);
    as(fx.actors.customer);
    expect((await getPreview(new Request("http://x/"), params({ revisionId: String(revisionId) }))).status).toBe(200);
  });

  it("refuses an area outside the up and QA's attempt; keeps the area prepress draws", async () => {
    as(fx.actors.prepress);
    const tooWide = await setExcludedAreas(fx.actors.prepress, revisionId, { areas: [{ ...areaInUp, x: 100, w: 20 }] }).catch((e: AppError) => e);
    expect(tooWide).toBeInstanceOf(AppError);
    expect((tooWide as AppError).message).toBe("Area 1 (lot and expiry): The area reaches outside one up (105 × 148 mm).");
    as(fx.actors.qa);
    const refused = await putAreas(new Request("http://x/", { method: "PUT", body: JSON.stringify({ areas: [areaInUp] }) }), params({ revisionId: String(revisionId) }));
    expect(refused.status).toBe(403);
    as(fx.actors.prepress);
    const ok = await putAreas(new Request("http://x/", { method: "PUT", body: JSON.stringify({ areas: [areaInUp] }) }), params({ revisionId: String(revisionId) }));
    expect(ok.status).toBe(200);
    const [row] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revisionId));
    expect(row.excludedAreas).toEqual([areaInUp]);
  });

  it("after approval the areas are locked, and a sheet with dots inside them (in both ups) gives no finding", async () => {
    as(fx.actors.prepress);
    expect((await approve(new Request("http://x/"), params({ revisionId: String(revisionId) }))).status).toBe(200);
    const locked = await putAreas(new Request("http://x/", { method: "PUT", body: JSON.stringify({ areas: [] }) }), params({ revisionId: String(revisionId) }));
    expect([locked.status, (await locked.json()).error.code]).toEqual([409, "artwork_locked"]);
    as(fx.actors.qa);
    const up = await postScans(multipart([{ name: "sheet-0501.png", data: spotted }]), params({ jobId: String(fx.jobId) }));
    expect(up.status).toBe(201);
    const scanId = (await up.json()).items[0].scanId;
    const done = await until("inspection", async () => {
      const [i] = await db.select().from(inspections).where(eq(inspections.scanId, scanId));
      return i && (i.status === "done" || i.status === "failed") ? i : null;
    });
    expect(done.status).toBe("done");
    expect(done.artworkRevisionId).toBe(revisionId);
    expect(await db.select().from(findings).where(eq(findings.inspectionId, done.id))).toEqual([]);
  });
});
