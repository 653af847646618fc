// The prepared artwork in the bucket (worker/prepared-artwork.ts) against the S3 fake: the raster job's object
// is found and read whole or band by band; a missing, damaged, truncated or stale object is not used (the sheet
// prepares for itself) and never fails the worker; a chunk found damaged while the bands are read is prepared
// there instead and the object removed.
import "./support/test-env";
import { beforeAll, describe, expect, it } from "vitest";
import { contrastWindows } from "@/lib/imaging/inspect";
import { preparePageRows, type PreparedRect, type PreparedRows } from "@/lib/imaging/compare/prepared";
import { preparationHalo, serialisePrepared } from "@/lib/imaging/compare/prepared-store";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import type { ArtworkRaster } from "@/lib/imaging/types";
import { newObjectId } from "@/storage/keys";
import { ensureBucket, getObjectBuffer, objectExists, putObject } from "@/storage/objects";
import { makeCartonPdf } from "@/tests/support/carton";
import { bucketSupply, preparedKey, storePrepared } from "@/worker/prepared-artwork";

let art: ArtworkRaster;
const windows = contrastWindows(100, 0.15, 0.2);

beforeAll(async () => {
  await ensureBucket();
  const { pdf } = await makeCartonPdf({ widthMm: 100, heightMm: 80, rows: 1, columns: 1 });
  art = await rasterisePage(pdf, { dpi: 100 });
}, 60_000);

const sameMaps = (a: PreparedRect, b: PreparedRect) => {
  for (const k of Object.keys(b).filter((k) => k !== "rect")) {
    expect(Buffer.from((a as never)[k] as Uint8Array).equals(Buffer.from((b as never)[k] as Uint8Array))).toBe(true);
  }
};

describe("prepared artwork in the bucket", () => {
  it("stores the page and loads it back whole, identical to a fresh preparation", async () => {
    const id = newObjectId();
    const key = preparedKey(id, art.dpi, windows);
    await storePrepared(key, art, windows);
    const loaded = (await bucketSupply(id, art, 0.2).load(windows)) as PreparedRect;
    expect(loaded.rect).toEqual({ x: 0, y: 0, w: art.width, h: art.height });
    sameMaps(loaded, await preparePageRows(art, 0, art.height, windows, 0));
  });

  it("finds nothing for windows it was not prepared for", async () => {
    const id = newObjectId();
    await storePrepared(preparedKey(id, art.dpi, windows), art, windows);
    expect(await bucketSupply(id, art, 0.2).load({ ...windows, opticalBlurPx: 0.4 })).toBeNull();
  });

  it("does not use a damaged, truncated or foreign object, and says why", async () => {
    const id = newObjectId();
    const key = preparedKey(id, art.dpi, windows);
    const good = serialisePrepared(await preparePageRows(art, 0, art.height, windows, 0), windows);
    const logged: string[] = [];
    const supply = bucketSupply(id, art, 0.2, (m) => logged.push(m));
    const damaged = good.slice();
    damaged[good.length - 100] ^= 1;
    for (const bad of [damaged, good.slice(0, good.length - 1), Buffer.from("PK\u0003\u0004 not ours"), new Uint8Array(0)]) {
      await putObject(key, bad, "application/octet-stream");
      expect(await supply.load(windows)).toBeNull();
    }
    expect(logged).toHaveLength(4);
    expect(logged[0]).toMatch(/damaged/);
    // The sheet then hands over its own preparation, which replaces the bad object.
    await supply.made!(windows, await preparePageRows(art, 0, art.height, windows, 0));
    expect(Buffer.from(await getObjectBuffer(key)).equals(Buffer.from(good))).toBe(true);
  });

  it("reads a large page band by band, and prepares rows itself from a chunk found damaged", async () => {
    // Band by band as a page over CACHE_MAX_PIXELS is read (asked for here on a small page: wholeUpTo 0).
    const big = art;
    const id = newObjectId();
    const key = preparedKey(id, big.dpi, windows);
    await storePrepared(key, big, windows);
    const rows = (await bucketSupply(id, big, 0.2, console.warn, 0).load(windows)) as PreparedRows;
    expect(typeof rows).toBe("function");
    const y = 100, h = 150;
    sameMaps(await rows(y, h), await preparePageRows(big, y, h, windows, preparationHalo(windows)));
    // Damage a chunk past the one just read: those rows are prepared afresh, and the object goes.
    const bytes = new Uint8Array(await getObjectBuffer(key));
    const late = big.height - 20; // in the last chunk, not yet read
    const dataStart = 12 + new DataView(bytes.buffer).getUint32(8, true), chunks = Math.ceil(big.height / 256);
    const perPixel = (bytes.length - dataStart - 4 * chunks) / (big.width * big.height);
    bytes[dataStart + Math.floor(late / 256) * (256 * big.width * perPixel + 4) + 100] ^= 0xff;
    await putObject(key, bytes, "application/octet-stream");
    const logged: string[] = [];
    const rows2 = (await bucketSupply(newObjectId(), big, 0.2, (m) => logged.push(m), 0).load(windows)) as PreparedRows | null;
    expect(rows2).toBeNull(); // another revision: nothing stored
    const fresh = bucketSupply(id, big, 0.2, (m) => logged.push(m), 0);
    const again = (await fresh.load(windows)) as PreparedRows; // the thread's last reader: already open
    const tail = Math.min(h, big.height - late);
    sameMaps(await again(late, tail), await preparePageRows(big, late, tail, windows, preparationHalo(windows)));
    expect(await objectExists(key)).toBe(false);
  }, 60_000);
});
