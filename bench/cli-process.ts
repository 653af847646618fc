// Whole-process times and peak memory of `npm run inspect` (tsx start-up, pdf.js, the scan's decode, the engine)
// on three sheet sizes, beside pixelmatch and odiff run as whole processes on the same pixels. Each case's files are
// made in a child process first (`make CASE DIR`), so the measured CLI process starts cold, as a user's would.
import { execFileSync, spawnSync } from "node:child_process";
import { writeFileSync } from "node:fs";
import path from "node:path";
import sharp from "sharp";
import { rasterisePage } from "../lib/imaging/rasterise";
import { makeCartonPdf, type CartonOptions } from "../tests/support/carton";
import { applyDefects } from "../tests/support/simulator/defects";
import { simulateSheet } from "../tests/support/simulator/index";

interface CliCase {
  name: string;
  carton: CartonOptions;
  dpi: number;
  /** Target for the whole process, s. */
  targetS: number;
  targetMb?: number;
}

export const CLI_CASES: CliCase[] = [
  { name: "B2 at 100 dpi", carton: { widthMm: 707, heightMm: 500, rows: 3, columns: 5 }, dpi: 100, targetS: 4 },
  { name: "A4 at 300 dpi", carton: { widthMm: 210, heightMm: 297, rows: 2, columns: 1 }, dpi: 300, targetS: 5 },
  { name: "B1 at 300 dpi", carton: { widthMm: 1000, heightMm: 707, rows: 4, columns: 6 }, dpi: 300, targetS: 15, targetMb: 2048 },
];

const slug = (c: CliCase) => c.name.replace(/\W+/g, "-").toLowerCase();

/** Writes DIR/<case>.pdf and a JPEG scan (q92, resolution tagged) with two defects; large pages without simulation. */
async function make(c: CliCase, dir: string): Promise<void> {
  const { pdf, layout } = await makeCartonPdf(c.carton);
  writeFileSync(path.join(dir, `${slug(c)}.pdf`), pdf);
  const art = await rasterisePage(pdf, { dpi: c.dpi });
  const up = layout.upParts[0].panel;
  const defects = [
    { type: "dot" as const, xMm: 20, yMm: 5, diameterMm: 1 },
    { type: "void" as const, xMm: up.x + 20, yMm: up.y + up.h - 5, diameterMm: 0.8 },
  ];
  let scan = art;
  if (art.width * art.height < 30e6) {
    scan = (await simulateSheet(art, { defects, geometry: { rotationDeg: 0.3, scale: 1.0005, marginMm: 6 }, seed: 3 })).scan as unknown as typeof art;
  } else applyDefects(art, defects);
  const raw = (img: { data: Uint8Array | Uint8ClampedArray; width: number; height: number }) =>
    sharp(img.data, { raw: { width: img.width, height: img.height, channels: 4 } });
  await raw(scan).jpeg({ quality: 92 }).withDensity(c.dpi).toFile(path.join(dir, `${slug(c)}.jpg`));
  // The same pixels for the peers: artwork and scan as PNG of one size.
  await raw(art).png({ compressionLevel: 1 }).toFile(path.join(dir, `${slug(c)}-artwork.png`));
}

/** Wall time (s) and peak RSS (MB) of one process, by GNU time. */
export function timeProcess(cmd: string, args: string[], cwd: string): { s: number; mb: number; code: number; stdout: string } {
  const r = spawnSync("/usr/bin/time", ["-f", "TIME %e %M", cmd, ...args], { cwd, encoding: "utf8", maxBuffer: 64 << 20 });
  const m = /TIME ([\d.]+) (\d+)\s*$/.exec(r.stderr);
  if (!m) throw new Error(`${cmd} ${args.join(" ")}: ${r.stderr.slice(-500)}`);
  return { s: Number(m[1]), mb: Math.round(Number(m[2]) / 1024), code: r.status ?? -1, stdout: r.stdout };
}

if (process.argv[2] === "make") {
  const c = CLI_CASES.find((k) => slug(k) === process.argv[3])!;
  await make(c, process.argv[4]);
}

export { make, slug };
void execFileSync;
