// Deep-zoom tiles of an inspected sheet, cut after the inspection in the same worker thread (the artwork raster,
// the scan and the alignment are still in memory; the alignment's local field is not stored anywhere else).
// Three DZI pyramids with sharp's .tile(): the artwork raster, the scan warped into the artwork's pixel grid
// (through the engine's exported warp) and a difference picture; all three share one grid, so the viewer lays
// them over each other pixel for pixel. Written to a temporary folder, uploaded, then recorded in one update; a
// failure leaves the earlier tiles (if any) in place and marks the sheet's tiles failed, never the inspection.
import { mkdtemp, readdir, readFile, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import sharp from "sharp";
import { warpScanToArtwork } from "@/lib/imaging/align/align";
import type { Alignment, ArtworkRaster, RgbaImage } from "@/lib/imaging/types";
import { failTiles, markTilesPending, saveTiles, TILE_FORMAT, type TileLayer } from "@/lib/review/tiles";
import { keys, newObjectId } from "@/storage/keys";
import { deleteUnder, putObject } from "@/storage/objects";

const TILE_SIZE = 256;
/** Uploads in flight at once: enough to hide the bucket's latency, few enough for a shared host. */
const UPLOADS_IN_FLIGHT = 8;
/** Where the scan does not cover the page (a partial scan): a flat light grey, plainly not print. */
const UNCOVERED = [226, 226, 226] as const;
/** Channel differences below this (0–255, after the sheet's mean offset is taken out) are not drawn. */
const DIFFERENCE_FLOOR = 24;

export interface SheetImages {
  artwork: ArtworkRaster;
  scan: RgbaImage;
  alignment: Pick<Alignment, "artworkToScan" | "localField">;
}

/** The scan in the artwork's grid, with uncovered pixels painted grey; and the coverage mask. */
export function alignedScan({ artwork, scan, alignment }: SheetImages): { image: Uint8Array | Uint8ClampedArray; mask: Uint8Array } {
  const { image, mask } = warpScanToArtwork(scan, alignment, artwork);
  const data = image.data;
  for (let p = 0; p < mask.length; p++) {
    if (mask[p]) continue;
    const o = p * 4;
    data[o] = UNCOVERED[0];
    data[o + 1] = UNCOVERED[1];
    data[o + 2] = UNCOVERED[2];
    data[o + 3] = 255;
  }
  return { image: data, mask };
}

/**
 * A picture of where the aligned scan differs from the artwork, transparent elsewhere: magenta where the scan is
 * darker (ink where the artwork has less), blue where it is lighter (ink missing). The sheet's mean offset per
 * channel is taken out first so a uniform colour drift does not paint everything. This is a guide for the eye;
 * the engine's findings (normalised CIELAB, ΔE00) are the measure.
 */
export function differenceImage(artwork: ArrayLike<number>, scan: ArrayLike<number>, mask: ArrayLike<number>): Uint8Array {
  const n = mask.length;
  const offset = [0, 0, 0];
  let samples = 0;
  for (let p = 0; p < n; p += 7) {
    if (!mask[p]) continue;
    const o = p * 4;
    for (let c = 0; c < 3; c++) offset[c] += scan[o + c] - artwork[o + c];
    samples++;
  }
  for (let c = 0; c < 3; c++) offset[c] = samples ? offset[c] / samples : 0;
  const out = new Uint8Array(n * 4);
  for (let p = 0; p < n; p++) {
    if (!mask[p]) continue;
    const o = p * 4;
    const dr = scan[o] - offset[0] - artwork[o];
    const dg = scan[o + 1] - offset[1] - artwork[o + 1];
    const db = scan[o + 2] - offset[2] - artwork[o + 2];
    const largest = Math.max(Math.abs(dr), Math.abs(dg), Math.abs(db));
    if (largest < DIFFERENCE_FLOOR) continue;
    const darker = dr + dg + db < 0;
    out[o] = darker ? 196 : 16;
    out[o + 1] = darker ? 0 : 96;
    out[o + 2] = darker ? 120 : 220;
    out[o + 3] = Math.min(235, 80 + (largest - DIFFERENCE_FLOOR) * 3);
  }
  return out;
}

async function cutPyramid(dir: string, layer: TileLayer, data: Uint8Array | Uint8ClampedArray, width: number, height: number): Promise<void> {
  const image = sharp(data, { raw: { width, height, channels: 4 } });
  const encoded = TILE_FORMAT[layer] === "png" ? image.png({ compressionLevel: 6 }) : image.flatten({ background: "#ffffff" }).jpeg({ quality: 84 });
  await encoded.tile({ size: TILE_SIZE, overlap: 1, layout: "dz" }).toFile(path.join(dir, `${layer}.dz`));
}

async function filesUnder(dir: string): Promise<string[]> {
  const entries = await readdir(dir, { recursive: true, withFileTypes: true });
  return entries.filter((e) => e.isFile()).map((e) => path.relative(dir, path.join(e.parentPath, e.name)).split(path.sep).join("/"));
}

const contentTypeOf = (file: string) => (file.endsWith(".dzi") ? "application/xml" : file.endsWith(".png") ? "image/png" : "image/jpeg");

/** Cut, upload and record the three pyramids of one sheet. Returns the prefix stored, or null on failure. */
export async function buildTiles(inspectionId: number, images: SheetImages): Promise<{ prefix: string; files: number } | null> {
  const { artwork } = images;
  const prefix = keys.tilesPrefix(newObjectId());
  const dir = await mkdtemp(path.join(tmpdir(), "tympan-tiles-"));
  const uploaded: string[] = [];
  try {
    await markTilesPending(inspectionId);
    const { image: scan, mask } = alignedScan(images);
    await cutPyramid(dir, "artwork", artwork.data, artwork.width, artwork.height);
    await cutPyramid(dir, "scan", scan, artwork.width, artwork.height);
    await cutPyramid(dir, "difference", differenceImage(artwork.data, scan, mask), artwork.width, artwork.height);
    const files = (await filesUnder(dir)).filter((f) => f.endsWith(".dzi") || /_files\/\d+\/\d+_\d+\.(jpeg|png)$/.test(f));
    for (let i = 0; i < files.length; i += UPLOADS_IN_FLIGHT) {
      await Promise.all(
        files.slice(i, i + UPLOADS_IN_FLIGHT).map(async (file) => {
          await putObject(prefix + file, await readFile(path.join(dir, file)), contentTypeOf(file));
          uploaded.push(file);
        }),
      );
    }
    const replaced = await saveTiles(inspectionId, prefix);
    if (replaced) await deleteUnder(replaced).catch(() => undefined);
    return { prefix, files: files.length };
  } catch (error) {
    console.error(`inspection ${inspectionId}: cutting the zoom tiles failed`, error);
    await failTiles(inspectionId).catch(() => undefined);
    if (uploaded.length) await deleteUnder(prefix).catch(() => undefined);
    return null;
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}
