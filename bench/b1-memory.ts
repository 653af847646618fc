// Child process of the benchmark: one B1 sheet (1000 × 707 mm) at 300 dpi through rasterise → load scan →
// inspect (alignment included), printing its own peak RSS (process.resourceUsage().maxRSS) as JSON on the last line.
// `make-scan OUT.jpg` first writes the simulated scan (in its own process, so its memory does not count).
import { readFile, writeFile } from "node:fs/promises";
import sharp from "sharp";
import { growHeapBeforeMarking } from "../lib/imaging/heap";
import { inspectSheet } from "../lib/imaging/inspect";
import { loadScan } from "../lib/imaging/scan/load-scan";
import { getProfile } from "../lib/imaging/profiles";
import { rasterisePage } from "../lib/imaging/rasterise/rasterise";
import { makeCartonPdf } from "../tests/support/carton";
import { applyDefects } from "../tests/support/simulator/defects";

const CARTON = { widthMm: 1000, heightMm: 707, rows: 4, columns: 6 };
const DPI = 300;
const [mode, file] = process.argv.slice(2);
// The heap setting of the product's worker process, so that the peak measured is the one it would see.
growHeapBeforeMarking();
const { pdf, layout } = await makeCartonPdf(CARTON);
const started = performance.now();

if (mode === "make-scan") {
  const art = await rasterisePage(pdf, { dpi: DPI });
  const up = layout.upParts[7].panel;
  applyDefects(art, [
    { type: "dot", xMm: 20, yMm: 5, diameterMm: 1 },
    { type: "void", xMm: up.x + 20, yMm: up.y + up.h - 5, diameterMm: 0.8 },
  ]);
  await writeFile(file, await sharp(art.data, { raw: { width: art.width, height: art.height, channels: 4 } }).jpeg({ quality: 92 }).withDensity(DPI).toBuffer());
  console.log(JSON.stringify({ ms: Math.round(performance.now() - started) }));
} else {
  const t0 = performance.now();
  const artwork = await rasterisePage(pdf, { dpi: DPI });
  const t1 = performance.now();
  const scan = await loadScan(new Uint8Array(await readFile(file)));
  const t2 = performance.now();
  const profile = getProfile("standard-food");
  const result = await inspectSheet({ artwork, scan, profile, ups: layout.ups });
  const t3 = performance.now();
  console.log(
    JSON.stringify({
      width: artwork.width,
      height: artwork.height,
      megapixels: (artwork.width * artwork.height) / 1e6,
      findings: result.findings.length,
      rasteriseMs: Math.round(t1 - t0),
      loadScanMs: Math.round(t2 - t1),
      inspectMs: Math.round(t3 - t2),
      stages: result.timingsMs,
      maxRssMb: Math.round(process.resourceUsage().maxRSS / 1024),
    }),
  );
}
