// The artwork's prepared side of the comparison (lib/imaging/compare/prepared-store.ts) in the bucket, where any worker
// host finds it: made by the raster job when the artwork is approved, for the likely scanner blur, and by the
// first sheet of a run whose scanner measures another. A missing, stale or damaged object is prepared again
// (logged, never fatal), so a bad file costs one sheet's preparation and nothing else.
import { Readable } from "node:stream";
import { CACHE_MAX_PIXELS, preparePageRows, type ContrastWindows, type PreparedRect, type PreparedRows } from "@/lib/imaging/compare/prepared";
import type { PreparedSupply } from "@/lib/imaging/inspect";
import { openPrepared, preparationHalo, PreparedUnusable, preparePageParts, serialisePreparedParts } from "@/lib/imaging/compare/prepared-store";
import type { RgbaImage } from "@/lib/imaging/types";
import { keys } from "@/storage/keys";
import { deleteObject, getObjectBuffer, getObjectRange, objectSize, putObject } from "@/storage/objects";

const CONTENT_TYPE = "application/octet-stream";

/** The object's name for a set of windows: every figure the preparation depends on besides the raster. */
export function preparedKey(sourceObjectId: string, dpi: number, w: ContrastWindows): string {
  return keys.prepared(sourceObjectId, dpi, `blur${w.opticalBlurPx}-sigma${w.sigmaPx.toFixed(4)}-r${w.radiusPx}-reach${w.reachPx}`);
}

/** Prepares the page and stores it (streamed part by part, so a B1 page is never whole in memory). */
export async function storePrepared(key: string, art: RgbaImage, windows: ContrastWindows): Promise<void> {
  await putObject(key, Readable.from(preparePageParts(art, windows)), CONTENT_TYPE);
}

/** Per thread: the reader of the last large page's object, so its sheets do not open it again. */
let lastReader: { key: string; rows: PreparedRows } | null = null;

/** The supply inspectSheet asks, for one approved revision's raster. */
export function bucketSupply(
  sourceObjectId: string,
  art: RgbaImage & { dpi: number },
  blurHintPx: number,
  log = console.warn,
  /** Pages up to this many pixels are loaded whole; larger ones band by band with ranged GETs. */
  wholeUpTo = CACHE_MAX_PIXELS,
): PreparedSupply {
  const keyOf = (w: ContrastWindows) => preparedKey(sourceObjectId, art.dpi, w);
  const expect = (windows: ContrastWindows) => ({ width: art.width, height: art.height, windows });
  return {
    blurHintPx,
    async load(windows): Promise<PreparedRect | PreparedRows | null> {
      const key = keyOf(windows);
      try {
        if (lastReader?.key === key) return lastReader.rows;
        const size = await objectSize(key);
        if (size === null) return null;
        if (art.width * art.height <= wholeUpTo) {
          const bytes = await getObjectBuffer(key);
          const reader = await openPrepared(async (o, n) => bytes.subarray(o, o + n), bytes.length, expect(windows));
          return await reader.rows(0, art.height);
        }
        const reader = await openPrepared((o, n) => getObjectRange(key, o, n), size, expect(windows));
        // A chunk found damaged as the bands are read: those rows are prepared here instead, and the object is
        // removed so that no later sheet reads it.
        let damaged = false;
        const rows: PreparedRows = async (y, h) => {
          if (!damaged) {
            try {
              return await reader.rows(y, h);
            } catch (error) {
              if (!(error instanceof PreparedUnusable)) throw error;
              damaged = true;
              if (lastReader?.key === key) lastReader = null;
              log(`prepared artwork ${key} is damaged (${error.message}); preparing the rest of the sheet here`);
              await deleteObject(key).catch(() => undefined);
            }
          }
          return preparePageRows(art, y, h, windows, preparationHalo(windows));
        };
        lastReader = { key, rows };
        return rows;
      } catch (error) {
        log(`prepared artwork ${key} not used: ${(error as Error).message}; preparing it again`);
        return null;
      }
    },
    async made(windows, page) {
      const key = keyOf(windows);
      try {
        await putObject(key, Readable.from(serialisePreparedParts(page, windows)), CONTENT_TYPE);
      } catch (error) {
        log(`prepared artwork ${key} not stored: ${(error as Error).message}`);
      }
    },
  };
}
