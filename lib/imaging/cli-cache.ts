// The command line's store of prepared artwork (prepared-store.ts): files in a cache directory, so a second run
// against the same artwork PDF, page and resolution loads the artwork's side instead of preparing it. Named by
// the PDF's SHA-256 and everything the preparation depends on; written to a temporary file and renamed, so a
// file is whole or absent. A file that cannot be used is prepared again and replaced.
import { createHash } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, open, readFile, rename, rm, stat } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import type { PreparedSupply } from "./inspect";
import { CACHE_MAX_PIXELS, type ContrastWindows, type PreparedRows } from "./compare/prepared";
import { openPrepared, preparePageParts, serialisePreparedParts, type PreparedExpectation } from "./compare/prepared-store";
import type { ArtworkRaster } from "./types";

export function defaultCacheDir(): string {
  return path.join(process.env.XDG_CACHE_HOME || path.join(os.homedir(), ".cache"), "tympan", "prepared");
}

export function fileSupply(dir: string, pdf: Uint8Array, page: number, art: ArtworkRaster, blurHintPx: number, warn: (s: string) => void): PreparedSupply {
  const pdfHash = createHash("sha256").update(pdf).digest("hex").slice(0, 32);
  const fileOf = (w: ContrastWindows) =>
    path.join(dir, `${pdfHash}-p${page}-${art.dpi}dpi-blur${w.opticalBlurPx}-sigma${w.sigmaPx.toFixed(4)}-r${w.radiusPx}-reach${w.reachPx}.bin`);
  const write = async (file: string, parts: Iterable<Uint8Array> | AsyncIterable<Uint8Array>) => {
    await mkdir(dir, { recursive: true });
    const temp = `${file}.${process.pid}.tmp`;
    try {
      await pipeline(Readable.from(parts), createWriteStream(temp));
      await rename(temp, file);
    } catch (error) {
      await rm(temp, { force: true });
      throw error;
    }
  };
  const read = async (file: string, expect: PreparedExpectation): Promise<PreparedRows | null> => {
    const size = (await stat(file).catch(() => null))?.size;
    if (size === undefined) return null;
    if (art.width * art.height <= CACHE_MAX_PIXELS) {
      const bytes = new Uint8Array(await readFile(file));
      const reader = await openPrepared(async (o, n) => bytes.subarray(o, o + n), bytes.length, expect);
      return reader.rows;
    }
    const handle = await open(file);
    const reader = await openPrepared(async (o, n) => {
      const out = new Uint8Array(n);
      const { bytesRead } = await handle.read(out, 0, n, o);
      return out.subarray(0, bytesRead);
    }, size, expect);
    return reader.rows;
  };
  return {
    blurHintPx,
    async load(windows) {
      const file = fileOf(windows);
      const expect = { width: art.width, height: art.height, windows };
      try {
        const rows = await read(file, expect);
        if (rows) return art.width * art.height <= CACHE_MAX_PIXELS ? await rows(0, art.height) : rows;
      } catch (error) {
        warn(`prepared artwork ${file} not used (${(error as Error).message}); preparing it again`);
      }
      if (art.width * art.height <= CACHE_MAX_PIXELS) return null; // the sheet prepares it whole and hands it over
      // A large page is prepared band by band into the file first, then read back band by band: memory stays bounded.
      try {
        await write(file, preparePageParts(art, windows));
        return await read(file, expect);
      } catch (error) {
        warn(`prepared artwork not kept in ${dir} (${(error as Error).message})`);
        return null;
      }
    },
    async made(windows, prepared) {
      await write(fileOf(windows), serialisePreparedParts(prepared, windows)).catch((error) =>
        warn(`prepared artwork not kept in ${dir} (${(error as Error).message})`),
      );
    },
  };
}
