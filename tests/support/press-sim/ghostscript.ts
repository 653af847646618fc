// The press's RIP: Ghostscript (Debian's `ghostscript`), not the engine's pdf.js, renders the sheet to CMYK
// contone separations (pamcmyk32 device: one byte per ink, 255 = solid).
import { execFile } from "node:child_process";
import { mkdtemp, readFile, rm, writeFile } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";

export interface Separations {
  width: number;
  height: number;
  dpi: number;
  /** Interleaved C, M, Y, K, 0–255 ink. */
  cmyk: Uint8Array;
}

const run = promisify(execFile);

export async function renderSeparations(pdf: Uint8Array, dpi: number): Promise<Separations> {
  const dir = await mkdtemp(path.join(os.tmpdir(), "press-sim-gs-"));
  try {
    const input = path.join(dir, "in.pdf"), output = path.join(dir, "out.pam");
    await writeFile(input, pdf);
    try {
      await run("gs", ["-q", "-dNOPAUSE", "-dBATCH", "-dSAFER", "-sDEVICE=pamcmyk32", `-r${dpi}`,
        "-dTextAlphaBits=4", "-dGraphicsAlphaBits=4", `-sOutputFile=${output}`, input], { maxBuffer: 1 << 20 });
    } catch (err) {
      const e = err as NodeJS.ErrnoException;
      throw new Error(e.code === "ENOENT" ? "Ghostscript (gs) is not installed: apt-get install ghostscript" : `Ghostscript failed: ${e.message}`);
    }
    return parsePam(new Uint8Array(await readFile(output)), dpi);
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

function parsePam(bytes: Uint8Array, dpi: number): Separations {
  const end = Buffer.from(bytes.subarray(0, 512)).indexOf("ENDHDR\n");
  if (end < 0) throw new Error("Ghostscript wrote no PAM header");
  const header = Buffer.from(bytes.subarray(0, end)).toString("latin1");
  const field = (k: string) => Number(new RegExp(`${k} (\\d+)`).exec(header)?.[1]);
  const width = field("WIDTH"), height = field("HEIGHT");
  if (field("DEPTH") !== 4 || !/TUPLTYPE CMYK/.test(header)) throw new Error("Ghostscript output is not CMYK");
  const start = end + 7;
  return { width, height, dpi, cmyk: bytes.slice(start, start + width * height * 4) };
}
