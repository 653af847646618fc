// Zoom tiles: the worker's module writes three DZI pyramids (artwork, aligned scan, difference) into the bucket
// and records them; the tiles route serves them after the policy check (another customer's user: 404) and
// refuses paths outside the pyramids. The DZI format is Microsoft's Deep Zoom schema
// (http://schemas.microsoft.com/deepzoom/2008), which OpenSeadragon reads: the test checks its Size and tile files.
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb, db } from "@/db/client";
import { inspections } from "@/db/schema";
import type { Actor } from "@/lib/auth/policy";
import type { ArtworkRaster } from "@/lib/imaging/types";
import { parseTilePath } from "@/lib/review/tiles";
import { ensureBucket, listKeys, objectExists } from "@/storage/objects";
import { alignedScan, buildTiles, differenceImage } from "@/worker/processors/tiles";
import { makeSheet, type Sheet } from "./support";

let actor: Actor;
vi.mock("@/lib/auth/request-actor", () => ({ requestActor: async () => actor }));
const { GET } = await import("@/app/api/inspections/[inspectionId]/tiles/[...path]/route");

const W = 600, H = 360;
function page(spot: boolean): Uint8Array {
  const data = new Uint8Array(W * H * 4).fill(255);
  for (let y = 0; y < H; y++)
    for (let x = 0; x < W; x++) {
      const o = (y * W + x) * 4;
      if (x > 100 && x < 300 && y > 80 && y < 160) data.set([30, 60, 150], o); // a blue panel
      if (spot && (x - 450) ** 2 + (y - 250) ** 2 < 64) data.set([40, 40, 40], o); // a dark spot (hickey)
    }
  return data;
}
const artwork: ArtworkRaster = { width: W, height: H, data: page(false), dpi: 100, widthMm: (W * 25.4) / 100, heightMm: (H * 25.4) / 100, box: "TrimBox" };
// The scan covers the page's left 500 px only (a partial scan), in the artwork's own grid.
const scanWidth = 500;
const scanData = (() => {
  const full = page(true), out = new Uint8Array(scanWidth * H * 4);
  for (let y = 0; y < H; y++) out.set(full.subarray(y * W * 4, y * W * 4 + scanWidth * 4), y * scanWidth * 4);
  return out;
})();
const identity = { artworkToScan: [1, 0, 0, 0, 1, 0] as [number, number, number, number, number, number] };

let s: Sheet;
const get = (path: string) => GET(new Request("http://x/"), { params: Promise.resolve({ inspectionId: String(s.inspectionId), path: path.split("/") }) });

beforeAll(async () => {
  await ensureBucket();
  s = await makeSheet(1);
});
afterAll(async () => {
  await closeDb();
});

describe("zoom tiles", () => {
  it("the aligned scan is grey where the scan does not reach; the difference marks the spot and nothing on the clean panel", () => {
    const { image, mask } = alignedScan({ artwork, scan: { width: scanWidth, height: H, data: scanData }, alignment: identity });
    expect(mask[100 * W + 550]).toBe(0);
    expect([...image.subarray((100 * W + 550) * 4, (100 * W + 550) * 4 + 3)]).toEqual([226, 226, 226]);
    const diff = differenceImage(artwork.data, image, mask);
    expect(diff[(250 * W + 450) * 4 + 3]).toBeGreaterThan(0);
    expect(diff[(120 * W + 200) * 4 + 3]).toBe(0);
    expect(diff[(100 * W + 550) * 4 + 3]).toBe(0);
  });

  it("writes three DZI pyramids to the bucket and records them on the inspection", async () => {
    const result = await buildTiles(s.inspectionId, { artwork, scan: { width: scanWidth, height: H, data: scanData }, alignment: identity });
    expect(result).not.toBeNull();
    const [i] = await db.select().from(inspections).where(eq(inspections.id, s.inspectionId));
    expect(i).toMatchObject({ tilesStatus: "ready", tilesPrefix: result!.prefix });
    const stored = await listKeys(result!.prefix);
    expect(stored.length).toBe(result!.files);
    for (const layer of ["artwork", "scan", "difference"]) expect(stored).toContain(`${result!.prefix}${layer}.dzi`);
    // 600 × 360 px → levels 0 … ceil(log2(600)) = 10; the top level has ceil(600/256) × ceil(360/256) = 3 × 2 tiles.
    expect(stored.filter((k) => k.includes("artwork_files/10/"))).toHaveLength(6);
    expect(stored.filter((k) => k.includes("difference_files/10/") && k.endsWith(".png"))).toHaveLength(6);
  });

  it("a second run replaces the tiles and removes the first run's", async () => {
    const [before] = await db.select().from(inspections).where(eq(inspections.id, s.inspectionId));
    const again = await buildTiles(s.inspectionId, { artwork, scan: { width: scanWidth, height: H, data: scanData }, alignment: identity });
    expect(again!.prefix).not.toBe(before.tilesPrefix);
    expect(await objectExists(`${before.tilesPrefix}artwork.dzi`)).toBe(false);
  });

  it("the route serves the DZI and a tile to staff and the sheet's customer, 404 to another customer", async () => {
    actor = s.actors.customer;
    const dzi = await get("artwork.dzi");
    expect(dzi.status).toBe(200);
    expect(dzi.headers.get("content-type")).toBe("application/xml");
    const xml = await dzi.text();
    expect(xml).toContain("http://schemas.microsoft.com/deepzoom/2008");
    expect(xml).toMatch(/Height="360"[\s\S]*Width="600"/);
    actor = s.actors.reviewer;
    const tile = await get("scan_files/10/1_1.jpeg");
    expect(tile.status).toBe(200);
    const meta = await sharp(Buffer.from(await tile.arrayBuffer())).metadata();
    expect(meta.format).toBe("jpeg");
    actor = s.actors.otherCustomer;
    expect((await get("artwork.dzi")).status).toBe(404);
  });

  it("paths outside the pyramids are refused", async () => {
    actor = s.actors.admin;
    for (const bad of ["../crops/x.png", "artwork_files/10/0_0.png", "report.pdf", "scan_files/a/0_0.jpeg"]) {
      expect(parseTilePath(bad)).toBeNull();
      expect((await get(bad)).status).toBe(404);
    }
  });
});
