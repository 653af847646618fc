import { crc32, deflateSync } from "node:zlib";
import Color from "colorjs.io";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { deltaE00, rgbToXyzMatrix, srgb8ToLab } from "@/lib/imaging/colour/colour";
import { parseIccProfile } from "@/lib/imaging/scan/icc";
import { loadScan } from "@/lib/imaging/scan/load-scan";
import { ImagingError } from "@/lib/imaging/types";

// Test colours (8-bit sRGB): primaries, greys, skin tones and saturated print colours.
const COLOURS: [number, number, number][] = [
  [255, 0, 0], [0, 255, 0], [0, 0, 255], [0, 0, 0], [255, 255, 255], [128, 128, 128], [40, 40, 40],
  [224, 172, 140], [110, 72, 52], [0, 160, 230], [230, 0, 125], [255, 230, 0], [245, 130, 30], [13, 107, 120],
];
const BLOCK = 6; // px a colour block, so JPEG chroma subsampling leaves block centres flat

/** A strip of colour blocks, BLOCK × BLOCK px each, as 8-bit RGB. */
function strip(colours = COLOURS): { width: number; height: number; rgb: Buffer } {
  const width = colours.length * BLOCK;
  const rgb = Buffer.alloc(width * BLOCK * 3);
  for (let y = 0; y < BLOCK; y++) for (let x = 0; x < width; x++) rgb.set(colours[Math.floor(x / BLOCK)], (y * width + x) * 3);
  return { width, height: BLOCK, rgb };
}

function blockCentre(data: Uint8Array | Uint8ClampedArray, width: number, i: number): [number, number, number] {
  const o = ((BLOCK >> 1) * width + i * BLOCK + (BLOCK >> 1)) * 4;
  return [data[o], data[o + 1], data[o + 2]];
}

/** Largest CIEDE2000 between decoded block centres and the expected sRGB colours. */
function worstDeltaE00(data: Uint8Array | Uint8ClampedArray, width: number, expected: [number, number, number][]): number {
  return Math.max(
    ...expected.map((c, i) => {
      const [a, b] = [srgb8ToLab(...blockCentre(data, width, i)), srgb8ToLab(...c)];
      return deltaE00(a[0], a[1], a[2], b[0], b[1], b[2]);
    }),
  );
}

/** Baseline TIFF (TIFF 6.0, Adobe 1992): RGB, one strip, no compression, optional resolution and ICC (34675). */
function writeTiff(width: number, height: number, samples: Uint8Array | Uint16Array, opts: { icc?: Uint8Array; dpi?: number } = {}) {
  const bits = samples instanceof Uint16Array ? 16 : 8;
  const pixels = Buffer.from(samples.buffer, samples.byteOffset, samples.byteLength);
  const tags: [number, number, number, number | Buffer][] = [
    [256, 4, 1, width], [257, 4, 1, height], [258, 3, 3, Buffer.from(new Uint16Array([bits, bits, bits]).buffer)],
    [259, 3, 1, 1], [262, 3, 1, 2], [273, 4, 1, -1], [277, 3, 1, 3], [278, 4, 1, height], [279, 4, 1, pixels.length],
  ];
  if (opts.dpi) {
    const res = Buffer.from(new Uint32Array([opts.dpi, 1]).buffer);
    tags.push([282, 5, 1, res], [283, 5, 1, res], [296, 3, 1, 2]);
  }
  if (opts.icc) tags.push([34675, 7, opts.icc.length, Buffer.from(opts.icc)]);
  const ifd = Buffer.alloc(2 + tags.length * 12 + 4);
  const blobs: Buffer[] = [];
  let offset = 8 + ifd.length;
  ifd.writeUInt16LE(tags.length, 0);
  let stripOffsetAt = 0;
  tags.forEach(([tag, type, count, value], i) => {
    const o = 2 + i * 12;
    ifd.writeUInt16LE(tag, o);
    ifd.writeUInt16LE(type, o + 2);
    ifd.writeUInt32LE(count, o + 4);
    if (Buffer.isBuffer(value)) {
      const padded = value.length % 2 ? Buffer.concat([value, Buffer.alloc(1)]) : value;
      if (value.length <= 4) value.copy(ifd, o + 8);
      else {
        ifd.writeUInt32LE(offset, o + 8);
        blobs.push(padded);
        offset += padded.length;
      }
    } else if (tag === 273) stripOffsetAt = o + 8;
    else if (type === 3) ifd.writeUInt16LE(value, o + 8);
    else ifd.writeUInt32LE(value, o + 8);
  });
  ifd.writeUInt32LE(offset, stripOffsetAt);
  return Buffer.concat([Buffer.from([0x49, 0x49, 42, 0, 8, 0, 0, 0]), ifd, ...blobs, pixels]);
}

/**
 * An ICC v2 matrix/TRC display profile (ICC.1:2001-04, 6.3.1.2) with colorants adapted to the D50 PCS by Bradford.
 * Used for Adobe RGB (1998): primaries and white from Adobe Systems, "Adobe RGB (1998) Color Image Encoding",
 * 2005, section 4.2; gamma 563/256 (section 4.3.1.2).
 */
function matrixProfile(description: string, primaries: number[][], gamma: number): Buffer {
  const d65 = [0.3127 / 0.329, 1, (1 - 0.3127 - 0.329) / 0.329];
  const d50 = [0.9642, 1, 0.8249];
  const m = rgbToXyzMatrix(primaries, [0.3127, 0.329]);
  const brad = [0.8951, 0.2664, -0.1614, -0.7502, 1.7135, 0.0367, 0.0389, -0.0685, 1.0296];
  const bradInv = [0.9869929, -0.1470543, 0.1599627, 0.4323053, 0.5183603, 0.0492912, -0.0085287, 0.0400428, 0.9684867];
  const apply = (k: number[], v: number[]) => [0, 1, 2].map((r) => k[r * 3] * v[0] + k[r * 3 + 1] * v[1] + k[r * 3 + 2] * v[2]);
  const [cs, cd] = [apply(brad, d65), apply(brad, d50)];
  const adapt = (xyz: number[]) => apply(bradInv, apply(brad, xyz).map((v, i) => (v * cd[i]) / cs[i]));
  const colorant = (c: number) => adapt([m[c], m[3 + c], m[6 + c]]);
  const xyzTag = (v: number[]) => {
    const b = Buffer.alloc(20);
    b.write("XYZ ", 0, "latin1");
    v.forEach((x, i) => b.writeInt32BE(Math.round(x * 65536), 8 + i * 4));
    return b;
  };
  const curv = Buffer.alloc(14 + 2);
  curv.write("curv", 0, "latin1");
  curv.writeUInt32BE(1, 8);
  curv.writeUInt16BE(Math.round(gamma * 256), 12);
  const desc = Buffer.alloc(12 + description.length + 1 + 12 + 67);
  desc.write("desc", 0, "latin1");
  desc.writeUInt32BE(description.length + 1, 8);
  desc.write(description, 12, "latin1");
  const text = Buffer.concat([Buffer.from("text\0\0\0\0Invented test profile, no rights reserved\0", "latin1")]);
  const tags: [string, Buffer][] = [
    ["desc", desc], ["cprt", text], ["wtpt", xyzTag(d50)],
    ["rXYZ", xyzTag(colorant(0))], ["gXYZ", xyzTag(colorant(1))], ["bXYZ", xyzTag(colorant(2))],
    ["rTRC", curv], ["gTRC", curv], ["bTRC", curv],
  ];
  const pad4 = (b: Buffer) => (b.length % 4 ? Buffer.concat([b, Buffer.alloc(4 - (b.length % 4))]) : b);
  let offset = 128 + 4 + tags.length * 12;
  const table = Buffer.alloc(4 + tags.length * 12);
  table.writeUInt32BE(tags.length, 0);
  const bodies = tags.map(([sig, body], i) => {
    table.write(sig, 4 + i * 12, "latin1");
    table.writeUInt32BE(offset, 8 + i * 12);
    table.writeUInt32BE(body.length, 12 + i * 12);
    const padded = pad4(body);
    offset += padded.length;
    return padded;
  });
  const header = Buffer.alloc(128);
  header.writeUInt32BE(offset, 0);
  header.writeUInt32BE(0x02100000, 8);
  header.write("mntrRGB XYZ ", 12, "latin1");
  header.writeUInt16BE(2026, 24);
  header.writeUInt16BE(12, 26);
  header.writeUInt16BE(1, 28);
  header.write("acsp", 36, "latin1");
  d50.forEach((v, i) => header.writeInt32BE(Math.round(v * 65536), 68 + i * 4));
  return Buffer.concat([header, table, ...bodies]);
}

const ADOBE_RGB = matrixProfile("Adobe RGB (1998) test profile", [[0.64, 0.33], [0.21, 0.71], [0.15, 0.06]], 563 / 256);

/** Display P3 profile as shipped in libvips (taken from a file sharp tags with it). */
async function displayP3Profile(): Promise<Buffer> {
  const tagged = await sharp(Buffer.alloc(3), { raw: { width: 1, height: 1, channels: 3 } }).withIccProfile("p3").png().toBuffer();
  return (await sharp(tagged).metadata()).icc!;
}

/**
 * Samples of the test colours encoded in another RGB space, and the sRGB colours those stored samples stand for
 * (after their own quantisation), both by colorjs.io 0.7.1 (the reference).
 */
function encodeIn(space: "p3" | "a98rgb", bits: 8 | 16) {
  const { width, height } = strip();
  const max = bits === 8 ? 255 : 65535;
  const samples = bits === 8 ? new Uint8Array(width * height * 3) : new Uint16Array(width * height * 3);
  const coded = COLOURS.map((c) => new Color("srgb", c.map((v) => v / 255) as [number, number, number]).to(space).coords.map((v) => Math.round(Math.min(1, Math.max(0, Number(v))) * max)));
  const expected = coded.map(
    (q) => new Color(space, q.map((v) => v / max) as [number, number, number]).to("srgb").coords.map((v) => Math.round(Math.min(1, Math.max(0, Number(v))) * 255)) as [number, number, number],
  );
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) samples.set(coded[Math.floor(x / BLOCK)], (y * width + x) * 3);
  return { width, samples, expected };
}

async function expectImagingError(p: Promise<unknown>, code: string): Promise<ImagingError> {
  const err = await p.then(() => null, (e: unknown) => e);
  expect(err).toBeInstanceOf(ImagingError);
  expect((err as ImagingError).code).toBe(code);
  return err as ImagingError;
}

describe("loadScan: formats", () => {
  const { width, height, rgb } = strip();
  const raw = { raw: { width, height, channels: 3 as const } };

  it.each(["none", "lzw", "deflate"] as const)("decodes an 8-bit TIFF (%s compression) exactly", async (compression) => {
    const file = await sharp(rgb, raw).tiff({ compression }).withDensity(300).toBuffer();
    const scan = await loadScan(file);
    expect(scan).toMatchObject({ width, height, dpi: 300, dpiSource: "file", format: "tiff", bitsPerSample: 8, colourConversion: "none" });
    COLOURS.forEach((c, i) => expect(blockCentre(scan.data, width, i)).toEqual(c));
    expect(scan.data[3]).toBe(255);
  });

  it.each(["none", "lzw", "deflate"] as const)("reduces a 16-bit TIFF (%s) to the nearest 8-bit level", async (compression) => {
    const levels = [0, 128, 129, 385, 386, 1000, 32767, 32896, 50000, 65407, 65535, 20000, 40000, 60000];
    const samples = new Uint16Array(width * height * 3);
    for (let p = 0; p < width * height; p++) samples.fill(levels[Math.floor((p % width) / BLOCK)], p * 3, p * 3 + 3);
    const file = await sharp(samples, raw).toColourspace("rgb16").tiff({ compression }).withDensity(600).toBuffer();
    const scan = await loadScan(file);
    expect(scan).toMatchObject({ bitsPerSample: 16, dpi: 600 });
    levels.forEach((v, i) => expect(blockCentre(scan.data, width, i)[0]).toBe(Math.round((v * 255) / 65535)));
  });

  it("decodes PNG exactly and JPEG (quality 95) within 1.5 ΔE00 on flat blocks", async () => {
    const png = await loadScan(await sharp(rgb, raw).png().toBuffer(), { dpi: 300 });
    COLOURS.forEach((c, i) => expect(blockCentre(png.data, width, i)).toEqual(c));
    const jpeg = await loadScan(await sharp(rgb, raw).jpeg({ quality: 95, chromaSubsampling: "4:4:4" }).withDensity(300).toBuffer());
    expect(jpeg.format).toBe("jpeg");
    expect(worstDeltaE00(jpeg.data, width, COLOURS)).toBeLessThan(1.5);
  });

  it("flattens a PNG with transparency onto white and expands grey to RGB", async () => {
    const rgba = Buffer.from([0, 0, 0, 0, 0, 0, 0, 255]);
    const scan = await loadScan(await sharp(rgba, { raw: { width: 2, height: 1, channels: 4 } }).png().toBuffer(), { dpi: 300 });
    expect([...scan.data]).toEqual([255, 255, 255, 255, 0, 0, 0, 255]);
    const grey = await loadScan(await sharp(Buffer.from([30, 200]), { raw: { width: 2, height: 1, channels: 1 } }).png().toBuffer(), { dpi: 300 });
    expect([...grey.data]).toEqual([30, 30, 30, 255, 200, 200, 200, 255]);
  });
});

describe("loadScan: embedded colour profiles", () => {
  it("sharp 0.35.5 leaves a 16-bit TIFF with a Display P3 profile unconverted in raw output (why ./icc.ts exists)", async () => {
    const { width, samples } = encodeIn("p3", 16);
    const file = writeTiff(width, BLOCK, samples, { icc: await displayP3Profile(), dpi: 300 });
    const plain = await sharp(file).toColourspace("srgb").raw().toBuffer();
    expect(plain[0]).toBe(Math.round(samples[0] / 257)); // the stored P3 value, not sRGB red
    expect(Math.abs(plain[0] - 255)).toBeGreaterThan(10);
  });

  it.each([
    ["Display P3", "p3", 8],
    ["Display P3", "p3", 16],
    ["Adobe RGB (1998)", "a98rgb", 8],
    ["Adobe RGB (1998)", "a98rgb", 16],
  ] as const)("converts %s (%s) TIFFs of %i bits to sRGB within 0.5 ΔE00 of colorjs.io 0.7.1", async (_name, space, bits) => {
    const icc = space === "p3" ? await displayP3Profile() : ADOBE_RGB;
    expect(parseIccProfile(icc).kind).toBe("matrix");
    const { width, samples, expected } = encodeIn(space, bits);
    const scan = await loadScan(writeTiff(width, BLOCK, samples, { icc, dpi: 300 }));
    expect(scan.colourConversion).toBe("icc-matrix");
    // libvips' P3 profile and colorjs.io differ slightly (s15Fixed16 colorants): up to ~0.4 ΔE00 measured.
    expect(worstDeltaE00(scan.data, width, expected)).toBeLessThan(0.5);
  });

  it("agrees with sharp's own (lcms) conversion of 8-bit files within 2 levels, on both profiles", async () => {
    for (const [space, icc] of [["p3", await displayP3Profile()], ["a98rgb", ADOBE_RGB]] as const) {
      const { width, samples } = encodeIn(space, 8);
      const file = writeTiff(width, BLOCK, samples, { icc, dpi: 300 });
      const ours = await loadScan(file);
      const library = await loadScan(file, { iccConversion: "library" });
      expect(library.colourConversion).toBe("icc-library");
      let worst = 0;
      for (let i = 0; i < ours.data.length; i++) worst = Math.max(worst, Math.abs(ours.data[i] - library.data[i]));
      expect(worst).toBeLessThanOrEqual(2);
    }
  });

  it("takes an embedded sRGB profile as it is", async () => {
    const { width, height, rgb } = strip();
    const file = await sharp(rgb, { raw: { width, height, channels: 3 } }).withIccProfile("srgb").tiff({ compression: "lzw" }).toBuffer();
    const scan = await loadScan(file, { dpi: 300 });
    expect(scan.colourConversion).toBe("none");
    expect(worstDeltaE00(scan.data, width, COLOURS)).toBeLessThan(0.5);
  });
});

describe("loadScan: resolution", () => {
  const tiny = writeTiff(2, 1, new Uint8Array([1, 2, 3, 4, 5, 6]), { dpi: 400 });

  it("takes the file's resolution, and the caller's when given", async () => {
    expect(await loadScan(tiny)).toMatchObject({ dpi: 400, dpiSource: "file" });
    expect(await loadScan(tiny, { dpi: 300 })).toMatchObject({ dpi: 300, dpiSource: "caller" });
  });

  it("refuses a file without a resolution when none is given, and an absurd one", async () => {
    const bare = writeTiff(2, 1, new Uint8Array(6));
    await expectImagingError(loadScan(bare), "scan_dpi_unknown");
    await expectImagingError(loadScan(tiny, { dpi: 10 }), "scan_dpi_out_of_range");
  });
});

describe("loadScan: bad input", () => {
  /** A PNG whose IHDR (ISO/IEC 15948, 11.2.2) claims width × height, with a token IDAT. */
  function pngClaiming(width: number, height: number): Buffer {
    const chunk = (type: string, body: Buffer) => {
      const len = Buffer.alloc(4);
      len.writeUInt32BE(body.length);
      const tb = Buffer.concat([Buffer.from(type, "latin1"), body]);
      const crc = Buffer.alloc(4);
      crc.writeUInt32BE(crc32(tb));
      return Buffer.concat([len, tb, crc]);
    };
    const ihdr = Buffer.alloc(13);
    ihdr.writeUInt32BE(width, 0);
    ihdr.writeUInt32BE(height, 4);
    ihdr.set([8, 2, 0, 0, 0], 8);
    const sig = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    return Buffer.concat([sig, chunk("IHDR", ihdr), chunk("IDAT", deflateSync(Buffer.alloc(64))), chunk("IEND", Buffer.alloc(0))]);
  }

  it("refuses a PNG whose header claims 100000 × 100000 px before decoding it", async () => {
    const before = process.memoryUsage().rss;
    const err = await expectImagingError(loadScan(pngClaiming(100_000, 100_000), { dpi: 300 }), "scan_too_large");
    expect(err.message).toMatch(/100000 × 100000/);
    expect(process.memoryUsage().rss - before).toBeLessThan(200e6);
  });

  it("honours a lower pixel limit", async () => {
    const { width, height, rgb } = strip();
    const file = await sharp(rgb, { raw: { width, height, channels: 3 } }).png().toBuffer();
    await expectImagingError(loadScan(file, { dpi: 300, maxMegapixels: 0.0001 }), "scan_too_large");
  });

  it("refuses garbage, a truncated file and an unsupported format", async () => {
    await expectImagingError(loadScan(Buffer.from("definitely not an image")), "scan_unreadable");
    const { width, height, rgb } = strip();
    const jpeg = await sharp(rgb, { raw: { width, height, channels: 3 } }).jpeg().withDensity(300).toBuffer();
    await expectImagingError(loadScan(jpeg.subarray(0, jpeg.length >> 1)), "scan_unreadable");
    const tiff = await sharp(rgb, { raw: { width, height, channels: 3 } }).tiff({ compression: "lzw" }).withDensity(300).toBuffer();
    await expectImagingError(loadScan(tiff.subarray(0, tiff.length >> 1)), "scan_unreadable");
    const webp = await sharp(rgb, { raw: { width, height, channels: 3 } }).webp().toBuffer();
    const err = await expectImagingError(loadScan(webp, { dpi: 300 }), "scan_unsupported");
    expect(err.message).toMatch(/webp/);
  });
});
