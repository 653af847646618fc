// The deep-zoom tiles of a sheet: three DZI pyramids (artwork raster, scan warped into the artwork's grid,
// difference) under one prefix per run. The worker records them; the tiles route asks here which stored object a
// request names, after the policy check, so the bucket stays private and a path can never leave the prefix.
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { inspections } from "@/db/schema";
import type { Actor } from "@/lib/auth/policy";
import { notFound } from "@/lib/errors";
import { loadSheetFor } from "./load";

export const TILE_LAYERS = ["artwork", "scan", "difference"] as const;
export type TileLayer = (typeof TILE_LAYERS)[number];
/** The scan and artwork tiles are JPEG (photographic, small); the difference keeps transparency (PNG). */
export const TILE_FORMAT: Record<TileLayer, "jpeg" | "png"> = { artwork: "jpeg", scan: "jpeg", difference: "png" };

/** `artwork.dzi` or `artwork_files/12/3_4.jpeg`; anything else is refused. */
const TILE_PATH = /^(artwork|scan|difference)(?:\.dzi|_files\/\d{1,2}\/\d{1,5}_\d{1,5}\.(jpeg|png))$/;

export function parseTilePath(path: string): { layer: TileLayer; contentType: string } | null {
  const match = TILE_PATH.exec(path);
  if (!match) return null;
  const layer = match[1] as TileLayer;
  if (match[2] && match[2] !== TILE_FORMAT[layer]) return null;
  const contentType = path.endsWith(".dzi") ? "application/xml" : match[2] === "png" ? "image/png" : "image/jpeg";
  return { layer, contentType };
}

/** The storage key of one tile file, after checking the actor may read the sheet (another customer's: 404). */
export async function tileKeyFor(actor: Actor, inspectionId: number, path: string): Promise<{ key: string; contentType: string }> {
  const { inspection } = await loadSheetFor(actor, inspectionId, "inspection.read");
  const parsed = parseTilePath(path);
  if (!parsed || inspection.tilesStatus !== "ready" || !inspection.tilesPrefix) throw notFound("The tile");
  return { key: `${inspection.tilesPrefix}${path}`, contentType: parsed.contentType };
}

export async function markTilesPending(inspectionId: number): Promise<void> {
  await db.update(inspections).set({ tilesStatus: "pending" }).where(eq(inspections.id, inspectionId));
}

/** Points the sheet at a complete new set of tiles; returns the prefix it replaced (to delete after). */
export async function saveTiles(inspectionId: number, prefix: string): Promise<string | null> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select({ prefix: inspections.tilesPrefix }).from(inspections).where(eq(inspections.id, inspectionId)).for("update");
    await tx.update(inspections).set({ tilesStatus: "ready", tilesPrefix: prefix }).where(eq(inspections.id, inspectionId));
    return row?.prefix && row.prefix !== prefix ? row.prefix : null;
  });
}

export async function failTiles(inspectionId: number): Promise<void> {
  await db.update(inspections).set({ tilesStatus: "failed" }).where(eq(inspections.id, inspectionId));
}
