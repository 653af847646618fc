// The prepared artwork (prepared.ts) as bytes, so it is made once (when the artwork is approved, or by the first
// sheet) and loaded by any process after. Pure: bytes in and out; the caller does the file or bucket I/O.
//
// Layout: "TYMPREP1", the header's length (u32 LE), the header (JSON), then chunks of CHUNK_ROWS full rows, each
// holding every map's rows in the header's order and a CRC-32 of them. Chunks have a fixed size, so a band of
// rows is read without reading the rest (a B1 page at 300 dpi is about 690 MB prepared). The maps are whatever
// typed arrays the preparation makes (one or more values a pixel): a map added there is stored without a change
// here, and a stored object whose maps differ from what this build prepares is refused as stale.
import { crc32 } from "node:zlib";
import { BLEED_PX, CACHE_MAX_PIXELS, preparePageRows, prepareLowPassed, type ContrastWindows, type PreparedRect } from "./prepared";
import type { RgbaImage } from "../types";

/**
 * Bump whenever the preparation's arithmetic changes (the artwork's rendering, blur, low-pass, contrast
 * windows): objects of another version are prepared again instead of being misread. 2: supersampled rendering.
 */
export const PREPARATION_VERSION = 2;
const MAGIC = "TYMPREP1";
const CHUNK_ROWS = 256;

type TypedArray = Uint8Array | Int8Array | Uint16Array | Int16Array | Uint32Array | Int32Array | Float32Array | Float64Array;
const ARRAY_TYPES = { Uint8Array, Int8Array, Uint16Array, Int16Array, Uint32Array, Int32Array, Float32Array, Float64Array };
type ArrayTypeName = keyof typeof ARRAY_TYPES;

interface MapLayout {
  name: string;
  type: ArrayTypeName;
  /** Values a pixel. */
  components: number;
}

export interface PreparedHeader {
  magic: typeof MAGIC;
  version: number;
  width: number;
  height: number;
  windows: ContrastWindows;
  chunkRows: number;
  maps: MapLayout[];
}

/** A stored preparation that cannot be used: missing maps, another version or size, damaged bytes. */
export class PreparedUnusable extends Error {}

/** What a stored preparation must match to be used for this artwork raster and these windows. */
export interface PreparedExpectation {
  width: number;
  height: number;
  windows: ContrastWindows;
}

/** The maps this build prepares, learnt from a preparation of a tiny page (so nothing here lists them). */
function currentLayout(windows: ContrastWindows): MapLayout[] {
  const n = 4 * 4;
  const sample = prepareLowPassed(new Uint8Array(n * 4).fill(255), { x: 0, y: 0, w: 4, h: 4 }, windows);
  return mapsOf(sample, n);
}

function mapsOf(p: PreparedRect, pixels: number): MapLayout[] {
  const maps: MapLayout[] = [];
  for (const [name, value] of Object.entries(p)) {
    if (name === "rect") continue;
    const type = value?.constructor?.name as ArrayTypeName;
    if (!ArrayBuffer.isView(value) || !(type in ARRAY_TYPES)) throw new Error(`Prepared field ${name} is not a typed array`);
    const components = (value as TypedArray).length / pixels;
    if (!Number.isInteger(components) || components < 1) throw new Error(`Prepared map ${name} does not hold whole values a pixel`);
    maps.push({ name, type, components });
  }
  return maps;
}

const bytesPer = (m: MapLayout) => m.components * ARRAY_TYPES[m.type].BYTES_PER_ELEMENT;

function chunkBytes(header: PreparedHeader, rows: number): number {
  return header.maps.reduce((s, m) => s + rows * header.width * bytesPer(m), 0) + 4;
}

/** The stored form of a whole prepared page: the header, then one part a chunk (so a large page can be streamed). */
export function* serialisePreparedParts(page: PreparedRect, windows: ContrastWindows): Generator<Uint8Array> {
  const { w: width, h: height } = page.rect;
  const header: PreparedHeader = { magic: MAGIC, version: PREPARATION_VERSION, width, height, windows, chunkRows: CHUNK_ROWS, maps: mapsOf(page, width * height) };
  yield headerBytes(header);
  for (let y = 0; y < height; y += CHUNK_ROWS) yield chunkOf(header, page, y, Math.min(CHUNK_ROWS, height - y));
}

/**
 * The stored form written band by band: `header` first, then `chunk(part)` for parts of the page whose rows
 * start at a multiple of the chunk height (a preparation made band by band, as large pages are).
 */
export function preparedWriter(width: number, height: number, windows: ContrastWindows) {
  const header: PreparedHeader = { magic: MAGIC, version: PREPARATION_VERSION, width, height, windows, chunkRows: CHUNK_ROWS, maps: currentLayout(windows) };
  return {
    chunkRows: CHUNK_ROWS,
    header: () => headerBytes(header),
    /** The chunks of `part` (full rows from part.rect.y, a multiple of chunkRows). */
    *chunks(part: PreparedRect): Generator<Uint8Array> {
      if (part.rect.y % CHUNK_ROWS !== 0 || part.rect.w !== width) throw new Error("Prepared parts must be full rows from a chunk boundary");
      for (let y = 0; y < part.rect.h; y += CHUNK_ROWS) yield chunkOf(header, part, y, Math.min(CHUNK_ROWS, part.rect.h - y));
    },
  };
}

/**
 * Prepares the page for `windows` and yields its stored form part by part: whole when the page is small, else
 * in bands of full rows, each prepared with a halo so its edge rows see what a whole page would (wider than any
 * window of the preparation: the scanner blur's and low-pass's reach, the contrast windows and BLEED_PX).
 */
export async function* preparePageParts(art: RgbaImage, windows: ContrastWindows): AsyncGenerator<Uint8Array> {
  const writer = preparedWriter(art.width, art.height, windows);
  yield writer.header();
  const bandRows = art.width * art.height > CACHE_MAX_PIXELS ? writer.chunkRows * Math.max(1, Math.floor(4_000_000 / (art.width * writer.chunkRows))) : art.height;
  const halo = preparationHalo(windows);
  for (let y = 0; y < art.height; y += bandRows) {
    const part = await preparePageRows(art, y, Math.min(bandRows, art.height - y), windows, halo);
    yield* writer.chunks(part);
  }
}

/** Rows around a band that a preparation made band by band needs for its windows. */
export function preparationHalo(w: ContrastWindows): number {
  return Math.ceil(3 * w.opticalBlurPx + 4 * w.sigmaPx + w.reachPx) + BLEED_PX + 4;
}

export function serialisePrepared(page: PreparedRect, windows: ContrastWindows): Uint8Array {
  return concat([...serialisePreparedParts(page, windows)]);
}

function headerBytes(header: PreparedHeader): Uint8Array {
  const json = new TextEncoder().encode(JSON.stringify(header));
  const out = new Uint8Array(12 + json.length);
  out.set(new TextEncoder().encode(MAGIC));
  new DataView(out.buffer).setUint32(8, json.length, true);
  out.set(json, 12);
  return out;
}

/** Rows [y, y + rows) of `p` (counted from its own first row) as one chunk. */
function chunkOf(header: PreparedHeader, p: PreparedRect, y: number, rows: number): Uint8Array {
  const out = new Uint8Array(chunkBytes(header, rows));
  let o = 0;
  for (const m of header.maps) {
    const arr = (p as unknown as Record<string, TypedArray>)[m.name];
    if (!arr) throw new Error(`Prepared map ${m.name} is missing`);
    const per = bytesPer(m) * header.width;
    const bytes = new Uint8Array(arr.buffer, arr.byteOffset + y * per, rows * per);
    out.set(bytes, o);
    o += bytes.length;
  }
  new DataView(out.buffer).setUint32(o, crc32(out.subarray(0, o)), true);
  return out;
}

/** Reads `length` bytes at `offset` of the stored object (a file or a ranged GET). */
export type ReadRange = (offset: number, length: number) => Promise<Uint8Array>;

export interface PreparedReader {
  header: PreparedHeader;
  /** Full rows [y, y + h) of the stored page. */
  rows(y: number, h: number): Promise<PreparedRect>;
}

/**
 * Opens a stored preparation of `size` bytes; throws PreparedUnusable when it is not one this build can use for
 * `expect` (another version, size or windows, other maps, too short). Damaged chunks are found as they are read.
 */
export async function openPrepared(read: ReadRange, size: number, expect: PreparedExpectation): Promise<PreparedReader> {
  if (size < 12) throw new PreparedUnusable("too short");
  const head = await read(0, 12);
  if (new TextDecoder().decode(head.subarray(0, 8)) !== MAGIC) throw new PreparedUnusable("not a prepared artwork");
  const headerLength = new DataView(head.buffer, head.byteOffset, 12).getUint32(8, true);
  if (headerLength > 1 << 20 || 12 + headerLength > size) throw new PreparedUnusable("header too long");
  let header: PreparedHeader;
  try {
    header = JSON.parse(new TextDecoder().decode(await read(12, headerLength)));
  } catch {
    throw new PreparedUnusable("header unreadable");
  }
  if (header.version !== PREPARATION_VERSION) throw new PreparedUnusable(`prepared by version ${header.version}, this is ${PREPARATION_VERSION}`);
  if (header.width !== expect.width || header.height !== expect.height) throw new PreparedUnusable("prepared for another raster size");
  if (JSON.stringify(header.windows) !== JSON.stringify(expect.windows)) throw new PreparedUnusable("prepared for other windows");
  if (JSON.stringify(header.maps) !== JSON.stringify(currentLayout(expect.windows))) throw new PreparedUnusable("other maps than this build prepares");
  if (!(header.chunkRows > 0)) throw new PreparedUnusable("bad chunk height");
  const dataStart = 12 + headerLength;
  const fullChunk = chunkBytes(header, header.chunkRows);
  const chunks = Math.ceil(header.height / header.chunkRows);
  const expected = dataStart + (chunks - 1) * fullChunk + chunkBytes(header, header.height - (chunks - 1) * header.chunkRows);
  if (size !== expected) throw new PreparedUnusable(`${size} bytes where ${expected} were expected`);

  // Bands overlap by their halo: the last chunk read is kept, so each is read (and checked) about once.
  let kept: { index: number; bytes: Uint8Array } | null = null;
  const readChunk = async (c: number, cRows: number): Promise<Uint8Array> => {
    if (kept?.index === c) return kept.bytes;
    const chunk = await read(dataStart + c * fullChunk, chunkBytes(header, cRows));
    const body = chunk.length - 4;
    if (body < 0 || new DataView(chunk.buffer, chunk.byteOffset + body, 4).getUint32(0, true) !== crc32(chunk.subarray(0, body))) {
      throw new PreparedUnusable(`chunk ${c} is damaged`);
    }
    kept = { index: c, bytes: chunk };
    return chunk;
  };
  const rows = async (y: number, h: number): Promise<PreparedRect> => {
    if (y < 0 || h < 1 || y + h > header.height) throw new RangeError(`Rows ${y}–${y + h} lie outside the prepared page`);
    const W = header.width;
    const out = Object.fromEntries(header.maps.map((m) => [m.name, new ARRAY_TYPES[m.type](h * W * m.components)]));
    const first = Math.floor(y / header.chunkRows), last = Math.floor((y + h - 1) / header.chunkRows);
    for (let c = first; c <= last; c++) {
      const c0 = c * header.chunkRows, cRows = Math.min(header.chunkRows, header.height - c0);
      const chunk = await readChunk(c, cRows);
      const from = Math.max(y, c0), to = Math.min(y + h, c0 + cRows);
      let o = 0;
      for (const m of header.maps) {
        const per = bytesPer(m) * W;
        const target = out[m.name];
        new Uint8Array(target.buffer).set(chunk.subarray(o + (from - c0) * per, o + (to - c0) * per), (from - y) * per);
        o += cRows * per;
      }
    }
    return { rect: { x: 0, y, w: W, h }, ...out } as unknown as PreparedRect;
  };
  return { header, rows };
}

/** The whole stored page from its bytes; throws PreparedUnusable as openPrepared does. */
export async function deserialisePrepared(bytes: Uint8Array, expect: PreparedExpectation): Promise<PreparedRect> {
  const reader = await openPrepared(async (o, n) => bytes.subarray(o, o + n), bytes.length, expect);
  return reader.rows(0, reader.header.height);
}

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((s, p) => s + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}
