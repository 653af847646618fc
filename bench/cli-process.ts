// Whole-process times and peak memory of `npm run inspect` (tsx start-up, pdf.js, the scan's decode, the engine)
// on three sheet sizes, beside pixelmatch and odiff run as whole processes on the same pixels. Each case's files are
// made in a child process first (`make CASE DIR`), so the measured CLI process starts cold, as a user's would.
import { execFileSync, spawnSync } from "node:child_process";
import { writeFileSync } from "node:fs";
import path from "node:path";
import sharp from "sharp";
import { rasterisePage } from "../lib/imaging/rasterise/rasterise";
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

const ROOT = path.resolve(import.meta.dirname, "..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");
const f1 = (v: number) => v.toFixed(1);

/** Pixelmatch as a whole process on two PNG files (pngjs decode included), the peer of a CLI run. */
const PIXELMATCH_PROCESS = `
import { readFileSync } from "node:fs"; import { PNG } from "pngjs"; import pixelmatch from "pixelmatch";
const [a, b] = process.argv.slice(1).map((f) => PNG.sync.read(readFileSync(f)));
const n = pixelmatch(a.data, b.data, undefined, a.width, a.height, { threshold: 0.1 }); console.log(n);`;

/** The section of bench/RESULTS.md: every case's CLI process cold, filling the cache and from it, beside the peers. */
export async function cliProcessSection(out: string[], tmp: string, log: (s: string) => void): Promise<void> {
  const rows: string[] = [];
  const verdicts: string[] = [];
  for (const c of CLI_CASES) {
    log(`CLI process: ${c.name}`);
    execFileSync(TSX, [path.join(ROOT, "bench/cli-process.ts"), "make", slug(c), tmp], { cwd: ROOT, stdio: "ignore" });
    const [pdf, scan, png] = [".pdf", ".jpg", "-artwork.png"].map((e) => path.join(tmp, slug(c) + e));
    const cache = path.join(tmp, `cache-${slug(c)}`);
    const cli = (...extra: string[]) => timeProcess(TSX, [path.join(ROOT, "lib/imaging/cli.ts"), "--artwork", pdf, "--scan", scan, "--json", ...extra], ROOT);
    const cold = cli("--no-cache");
    const filling = cli("--cache", cache);
    const warm = cli("--cache", cache);
    const timings = JSON.parse(warm.stdout).timings_ms as Record<string, number>;
    const pm = timeProcess(process.execPath, ["--input-type=module", "-e", PIXELMATCH_PROCESS, png, png], ROOT);
    const odiffBin = path.join(ROOT, "node_modules/odiff-bin/bin/odiff");
    const od = timeProcess(odiffBin, [png, png, path.join(tmp, "diff.png"), "--threshold", "0.1"], ROOT);
    const ratio = (s: number) => `${(s / pm.s).toFixed(2)} × pixelmatch, ${(s / od.s).toFixed(2)} × odiff`;
    rows.push(
      `| ${c.name} | CLI, prepared afresh (--no-cache) | ${f1(cold.s)} | ${cold.mb} | ${ratio(cold.s)} |`,
      `| ${c.name} | CLI, first run: prepares and keeps the artwork's side | ${f1(filling.s)} | ${filling.mb} | ${ratio(filling.s)} |`,
      `| ${c.name} | CLI, artwork's side from the cache (as in the worker from the bucket) | ${f1(warm.s)} | ${warm.mb} | ${ratio(warm.s)} |`,
      `| ${c.name} | · inside it: ${Object.entries(timings).map(([k, v]) => `${k} ${f1(v / 1000)} s`).join(", ")} | | | |`,
      `| ${c.name} | pixelmatch 7.2 process (Node, pngjs decode of the artwork PNG twice) | ${f1(pm.s)} | ${pm.mb} | 1.00 |`,
      `| ${c.name} | odiff 4.5 process (same two files) | ${f1(od.s)} | ${od.mb} | ${(od.s / pm.s).toFixed(2)} × pixelmatch |`,
    );
    const met = (s: number, mb: number) => s <= c.targetS && (c.targetMb === undefined || mb <= c.targetMb);
    verdicts.push(
      `${c.name}: target ≤ ${c.targetS} s${c.targetMb ? ` and ≤ ${c.targetMb} MB` : ""}; from the cache ${f1(warm.s)} s / ${warm.mb} MB ` +
        `(${met(warm.s, warm.mb) ? "met" : "**not met**"}), prepared afresh ${f1(cold.s)} s / ${cold.mb} MB (${met(cold.s, cold.mb) ? "met" : "**not met**"}).`,
    );
  }
  out.push(
    "## Whole CLI process: `npm run inspect` from start to exit (tsx start-up, pdf.js, scan decode, engine), peak RSS",
    "",
    "Each case: the invented carton as PDF and a simulated JPEG q92 scan with the resolution tagged (B1 without the simulator, " +
      "to keep the maker's memory small), made in another process first. Peak RSS by GNU time (%M). The peers run as whole " +
      "processes on the artwork's PNG at the same size, so the ratios carry the machine's load of the moment.",
    "",
    "| sheet | process | s | peak RSS MB | ratio |",
    "|---|---|---:|---:|---|",
    ...rows,
    "",
    ...verdicts.map((v) => `- ${v}`),
    "",
  );
}

if (process.argv[2] === "make") {
  const c = CLI_CASES.find((k) => slug(k) === process.argv[3])!;
  await make(c, process.argv[4]);
} else if (import.meta.url === `file://${process.argv[1]}`) {
  const out: string[] = [];
  const { mkdtempSync } = await import("node:fs");
  const tmp = mkdtempSync(path.join((await import("node:os")).tmpdir(), "tympan-cli-bench-"));
  await cliProcessSection(out, tmp, console.error);
  console.log(out.join("\n"));
}
