// The stored form of the prepared artwork (lib/imaging/compare/prepared-store.ts): a sheet compared against a loaded
// preparation gives exactly the findings of one compared against a fresh preparation, whole or read band by
// band; a stored object that is damaged, of another version or size, or for other windows is refused. The
// CRC-32 that finds damaged chunks is the one of ISO 3309 / ITU-T V.42 (node:zlib's crc32, checked here against
// the standard check value of "123456789", 0xCBF43926, from the CRC catalogue's CRC-32/ISO-HDLC entry).
import { crc32 } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { inspectSheet, type PreparedSupply } from "@/lib/imaging/inspect";
import { type ContrastWindows, type PreparedRect } from "@/lib/imaging/compare/prepared";
import { deserialisePrepared, openPrepared, PreparedUnusable, PREPARATION_VERSION, serialisePrepared } from "@/lib/imaging/compare/prepared-store";
import { getProfile } from "@/lib/imaging/profiles";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import type { ArtworkRaster, InspectionResult, ScanImage } from "@/lib/imaging/types";
import { makeCartonPdf } from "@/tests/support/carton";
import { simulateSheet } from "@/tests/support/simulator/index";

let artwork: ArtworkRaster;
let scan: ScanImage;
let first: InspectionResult;
let stored: { windows: ContrastWindows; bytes: Uint8Array };

const fresh = (a: ArtworkRaster): ArtworkRaster => ({ ...a, data: new Uint8Array(a.data) });
const profile = () => getProfile("standard-food");
const findingsOf = (r: InspectionResult) => JSON.stringify(r.findings);

beforeAll(async () => {
  const { pdf } = await makeCartonPdf({ widthMm: 120, heightMm: 90, rows: 1, columns: 1 });
  artwork = await rasterisePage(pdf, { dpi: 150 });
  const sim = await simulateSheet(artwork, {
    defects: [{ type: "dot", xMm: 30, yMm: 30, diameterMm: 1 }],
    geometry: { rotationDeg: 0.4, scale: 1.001 },
    seed: 5,
  });
  scan = sim.scan;
  // The first sheet prepares the page and hands it over to be stored.
  const supply: PreparedSupply = {
    load: async () => null,
    made: async (windows, page) => void (stored = { windows, bytes: serialisePrepared(page, windows) }),
  };
  first = await inspectSheet({ artwork: fresh(artwork), scan, profile: profile(), prepared: supply });
}, 120_000);

describe("stored prepared artwork", () => {
  it("uses node:zlib's CRC-32 of ISO 3309 (check value 0xCBF43926)", () => {
    expect(crc32("123456789")).toBe(0xcbf43926);
  });

  it("hands over the preparation a sheet made, and finds the planted dot", () => {
    expect(stored.bytes.length).toBeGreaterThan(artwork.width * artwork.height * 7);
    expect(first.findings.length).toBeGreaterThan(0);
  });

  it("round trip: the loaded whole page gives identical findings", async () => {
    const page = await deserialisePrepared(stored.bytes, { width: artwork.width, height: artwork.height, windows: stored.windows });
    let asked: ContrastWindows | null = null;
    const r = await inspectSheet({
      artwork: fresh(artwork),
      scan,
      profile: profile(),
      prepared: { blurHintPx: stored.windows.opticalBlurPx, load: async (w) => ((asked = w), page) },
    });
    expect(asked).toEqual(stored.windows);
    expect(findingsOf(r)).toBe(findingsOf(first));
    expect(r.drift).toEqual(first.drift);
  });

  it("round trip band by band: rows read on demand give identical findings", async () => {
    const bytes = stored.bytes;
    const reader = await openPrepared(async (o, n) => bytes.slice(o, o + n), bytes.length, {
      width: artwork.width,
      height: artwork.height,
      windows: stored.windows,
    });
    const r = await inspectSheet({ artwork: fresh(artwork), scan, profile: profile(), prepared: { load: async () => reader.rows } });
    expect(findingsOf(r)).toBe(findingsOf(first));
  });

  it("serialises every map of the preparation, bit for bit", async () => {
    const page = await deserialisePrepared(stored.bytes, { width: artwork.width, height: artwork.height, windows: stored.windows });
    const again = serialisePrepared(page, stored.windows);
    expect(Buffer.compare(Buffer.from(again), Buffer.from(stored.bytes))).toBe(0);
    const maps = Object.keys(page).filter((k) => k !== "rect");
    expect(maps.length).toBeGreaterThanOrEqual(4);
    for (const k of maps) expect(ArrayBuffer.isView((page as unknown as Record<string, unknown>)[k])).toBe(true);
  });

  it("refuses damaged, stale and mismatched objects", async () => {
    const expect0 = { width: artwork.width, height: artwork.height, windows: stored.windows };
    const refuse = (bytes: Uint8Array, e = expect0) => expect(deserialisePrepared(bytes, e)).rejects.toBeInstanceOf(PreparedUnusable);
    await refuse(stored.bytes.slice(0, stored.bytes.length - 10));
    const flipped = stored.bytes.slice();
    flipped[flipped.length - 5000] ^= 0x40;
    await refuse(flipped);
    await refuse(new TextEncoder().encode("not a prepared artwork at all"));
    const header = new TextDecoder().decode(stored.bytes.subarray(12, 400));
    const older = stored.bytes.slice();
    older.set(new TextEncoder().encode(header.replace(`"version":${PREPARATION_VERSION}`, `"version":${PREPARATION_VERSION + 1}`)), 12);
    await refuse(older);
    await refuse(stored.bytes, { ...expect0, width: expect0.width + 1 });
    await refuse(stored.bytes, { ...expect0, windows: { ...stored.windows, opticalBlurPx: stored.windows.opticalBlurPx + 0.1 } });
  });

  it("refuses an object whose maps are not the ones this build prepares", async () => {
    const page = await deserialisePrepared(stored.bytes, { width: artwork.width, height: artwork.height, windows: stored.windows });
    const extra = { ...page, extraMap: new Uint8Array(page.rect.w * page.rect.h) } as PreparedRect;
    await expect(deserialisePrepared(serialisePrepared(extra, stored.windows), { width: artwork.width, height: artwork.height, windows: stored.windows })).rejects.toBeInstanceOf(
      PreparedUnusable,
    );
  });
});
