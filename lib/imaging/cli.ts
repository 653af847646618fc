// `npm run inspect -- --artwork A.pdf --scan S.tif [options]`: one press sheet through the same entry point the
// worker uses. Exit 0 without findings, 1 with findings, 2 on error (one line on stderr).
import { readFile, rename, rm, writeFile } from "node:fs/promises";
import path from "node:path";
import { parseArgs } from "node:util";
import sharp from "sharp";
import { alignScan } from "./align/align";
import { defaultCacheDir, fileSupply } from "./cli-cache";
import { identityAlignment, inspectSheet, likelyScannerBlurPx } from "./inspect";
import { loadScan } from "./scan/load-scan";
import { loadOpenCv } from "./align/opencv";
import { getProfile } from "./profiles";
import { MIN_DPI, rasterisePage, readPdfPages } from "./rasterise/rasterise";
import { estimateScanDpi, measuredDpi } from "./scan/scan-dpi";
import { ImagingError, type Alignment, type ArtworkRaster, type Finding, type InspectionResult, type RectMm, type UpsLayout } from "./types";

/** Highest resolution compared at unless --artwork-dpi asks (see comparisonDpi). */
export const COMPARISON_MAX_DPI = 300;

const USAGE = `Usage: npm run inspect -- --artwork ARTWORK.pdf --scan SCAN.tif [options]

  --page N            artwork page (default 1)
  --dpi N             scan resolution in dpi; overrides the file's (default: the file's, else measured
                      from the scan against the page)
  --artwork-dpi N     resolution to compare at (default: the scan's, at most ${COMPARISON_MAX_DPI})
  --cache DIR         keep the artwork's prepared side here for the next run (default ${"$"}XDG_CACHE_HOME/tympan/prepared)
  --no-cache          prepare the artwork's side afresh and keep nothing
  --profile NAME      tolerance profile (default standard-food)
  --ups RxC           ups on the sheet, rows × columns, e.g. 3x5
  --exclude x,y,w,h   area to leave out, mm from the trim box's top-left (repeatable), e.g. the sheet number
  --pre-aligned       the scan is already in the artwork's pixel grid (same size and resolution)
  --json              print one JSON object instead of the summary
  --annotate OUT.png  write the artwork with finding boxes drawn

Colour figures from a scan are indicative only; a spectrophotometer decides on colour, and sign-off stays with
qualified staff.`;

interface Io {
  stdout: (s: string) => void;
  stderr: (s: string) => void;
}

/** Runs the command line; returns the exit code. */
export async function runInspect(argv: string[], io: Io): Promise<number> {
  try {
    const args = readArgs(argv);
    if (args.help) {
      io.stdout(USAGE + "\n");
      return 0;
    }
    const timings: Record<string, number> = {};
    const timed = async <T>(name: string, f: () => Promise<T>): Promise<T> => {
      const t = performance.now();
      const value = await f();
      timings[name] = Math.round((performance.now() - t) * 10) / 10;
      return value;
    };
    const [pdfBytes, scanBytes] = await Promise.all([readInput(args.artwork, "artwork"), readInput(args.scan, "scan")]);
    const scan = await timed("load_scan", () => loadScan(scanBytes, { dpi: args.dpi, allowUnknownDpi: true }));
    if (scan.dpiSource === "unknown") {
      const { pages } = await timed("read_pdf", () => readPdfPages(pdfBytes));
      const page = pages[args.page - 1];
      if (!page) throw new ImagingError("page_out_of_range", `The artwork has ${pages.length} page${pages.length === 1 ? "" : "s"}; page ${args.page} does not exist.`);
      scan.dpi = estimateScanDpi(scan, page);
    }
    const artworkDpi = args.artworkDpi ?? comparisonDpi(scan.dpi);
    // OpenCV (the alignment's) loads meanwhile: its WebAssembly compiles off the main thread while pdf.js renders.
    if (!args.preAligned) void loadOpenCv().catch(() => undefined);
    const artwork = await timed("rasterise", () => rasterisePage(pdfBytes, { page: args.page, dpi: artworkDpi }));
    const profile = getProfile(args.profile);
    profile.excludedAreasMm.push(...args.exclude);
    let alignment: Alignment | undefined;
    if (args.preAligned) {
      if (scan.width !== artwork.width || scan.height !== artwork.height || scan.dpi !== artwork.dpi) {
        throw new ImagingError(
          "usage",
          `--pre-aligned needs the scan in the artwork's grid: scan ${scan.width} × ${scan.height} px at ${scan.dpi} dpi, ` +
            `artwork ${artwork.width} × ${artwork.height} px at ${artwork.dpi} dpi.`,
        );
      }
      alignment = identityAlignment(artwork, scan);
    } else if (scan.dpiSource === "unknown") {
      // The estimate placed the scan; the scale the alignment fitted measures its resolution.
      alignment = (await timed("align", () => alignScan(artwork, scan))).alignment;
      scan.dpi = measuredDpi(scan.dpi, alignment.scale);
      scan.dpiSource = "measured";
      alignment = { ...alignment, scale: 1 };
    }
    const prepared = args.cache ? fileSupply(args.cache, pdfBytes, args.page, artwork, likelyScannerBlurPx(artwork.dpi), io.stderr) : undefined;
    const result = await timed("inspect", () => inspectSheet({ artwork, scan, profile, ups: args.ups, alignment, prepared }));
    Object.assign(timings, result.timingsMs, { align: (timings.align ?? 0) + result.timingsMs.align });
    if (args.annotate) await timed("annotate", () => writeAnnotated(args.annotate!, artwork, result.findings));
    const engine = { ...result, timingsMs: timings };
    const resolution = { scan_dpi: scan.dpi, scan_dpi_source: scan.dpiSource, compared_at_dpi: artwork.dpi };
    io.stdout(args.json ? JSON.stringify({ ...toJson(engine), resolution }) + "\n" : summary(engine, args, resolution));
    return result.findings.length > 0 ? 1 : 0;
  } catch (err) {
    const code = err instanceof ImagingError ? err.code : "internal";
    const message = (err as Error)?.message ?? String(err);
    io.stderr(`error: ${code}: ${message.replace(/\s*\n\s*/g, " ")}\n`);
    return 2;
  }
}

interface Args {
  artwork: string;
  scan: string;
  page: number;
  dpi?: number;
  artworkDpi?: number;
  profile: string;
  ups?: UpsLayout;
  exclude: RectMm[];
  preAligned: boolean;
  json: boolean;
  annotate?: string;
  /** Directory of prepared artwork, or undefined with --no-cache. */
  cache?: string;
  help: boolean;
}

function readArgs(argv: string[]): Args {
  let values;
  try {
    ({ values } = parseArgs({
      args: argv,
      strict: true,
      allowPositionals: false,
      options: {
        artwork: { type: "string" },
        scan: { type: "string" },
        page: { type: "string" },
        dpi: { type: "string" },
        "artwork-dpi": { type: "string" },
        profile: { type: "string" },
        ups: { type: "string" },
        exclude: { type: "string", multiple: true },
        "pre-aligned": { type: "boolean" },
        json: { type: "boolean" },
        annotate: { type: "string" },
        cache: { type: "string" },
        "no-cache": { type: "boolean" },
        help: { type: "boolean", short: "h" },
      },
    }));
  } catch (err) {
    throw new ImagingError("usage", `${(err as Error).message}. Run with --help for the options.`);
  }
  if (values.help) return { help: true } as Args;
  if (!values.artwork || !values.scan) throw new ImagingError("usage", "Both --artwork and --scan are required. Run with --help for the options.");
  const number = (name: string, v: string | undefined, integer = false) => {
    if (v === undefined) return undefined;
    const n = Number(v);
    if (!Number.isFinite(n) || n <= 0 || (integer && !Number.isInteger(n))) {
      throw new ImagingError("usage", `--${name} must be a positive ${integer ? "whole " : ""}number. Got "${v}".`);
    }
    return n;
  };
  let ups: UpsLayout | undefined;
  if (values.ups !== undefined) {
    const m = /^(\d+)\s*[x×]\s*(\d+)$/i.exec(values.ups);
    if (!m || +m[1] < 1 || +m[2] < 1) throw new ImagingError("usage", `--ups must look like 3x5 (rows x columns). Got "${values.ups}".`);
    ups = { rows: +m[1], columns: +m[2] };
  }
  const exclude = (values.exclude ?? []).map((s) => {
    const v = s.split(",").map(Number);
    if (v.length !== 4 || v.some((n) => !Number.isFinite(n)) || v[2] < 0 || v[3] < 0) {
      throw new ImagingError("usage", `--exclude must be x,y,w,h in mm. Got "${s}".`);
    }
    return { x: v[0], y: v[1], w: v[2], h: v[3] };
  });
  return {
    artwork: values.artwork,
    scan: values.scan,
    page: number("page", values.page, true) ?? 1,
    dpi: number("dpi", values.dpi),
    artworkDpi: number("artwork-dpi", values["artwork-dpi"]),
    profile: values.profile ?? "standard-food",
    ups,
    exclude,
    preAligned: values["pre-aligned"] ?? false,
    json: values.json ?? false,
    annotate: values.annotate,
    cache: values["no-cache"] ? undefined : (values.cache ?? defaultCacheDir()),
    help: false,
  };
}

async function readInput(file: string, what: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(file));
  } catch (err) {
    const reason = (err as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (err as Error).message;
    throw new ImagingError("file_unreadable", `Cannot read the ${what} file ${file}: ${reason}.`);
  }
}

const round = (v: number, digits = 3) => Math.round(v * 10 ** digits) / 10 ** digits;

/** The CLI's JSON: snake_case, mm to the micrometre. */
export function toJson(r: InspectionResult) {
  const a = r.alignment;
  return {
    alignment: { rotation_deg: round(a.rotationDeg, 4), scale: round(a.scale, 6), tx_mm: round(a.txMm), ty_mm: round(a.tyMm), residual_px: round(a.residualPx) },
    covered_mm: { x: round(r.coveredMm.x), y: round(r.coveredMm.y), w: round(r.coveredMm.w), h: round(r.coveredMm.h) },
    drift: { deltaE00: round(r.drift.deltaE00, 2) },
    findings: r.findings.map((f) => ({
      x_mm: round(f.xMm),
      y_mm: round(f.yMm),
      w_mm: round(f.wMm),
      h_mm: round(f.hMm),
      area_mm2: round(f.areaMm2),
      kind: f.kind,
      deltaE00_mean: round(f.deltaE00Mean, 2),
      deltaE00_max: round(f.deltaE00Max, 2),
      up: f.up,
    })),
    timings_ms: r.timingsMs,
  };
}

function summary(r: InspectionResult, args: Args, res: { scan_dpi: number; scan_dpi_source: string; compared_at_dpi: number }): string {
  const a = r.alignment;
  const c = r.coveredMm;
  const lines = [
    `Artwork ${path.basename(args.artwork)} page ${args.page}, scan ${path.basename(args.scan)}, profile ${args.profile}`,
    `Alignment: rotation ${a.rotationDeg.toFixed(3)}°, scale ${a.scale.toFixed(5)}, shift ${a.txMm.toFixed(2)} × ${a.tyMm.toFixed(2)} mm, ` +
      `residual ${a.residualPx.toFixed(2)} px`,
    `Resolution: scan ${res.scan_dpi} dpi (${DPI_SOURCE[res.scan_dpi_source] ?? res.scan_dpi_source}), compared at ${res.compared_at_dpi} dpi`,
    `Covered: ${c.w.toFixed(1)} × ${c.h.toFixed(1)} mm from (${c.x.toFixed(1)}, ${c.y.toFixed(1)}) mm`,
    `Colour drift of the sheet: ΔE00 ${r.drift.deltaE00.toFixed(2)} (indicative; a spectrophotometer decides)`,
    r.findings.length === 0 ? "No findings." : `${r.findings.length} finding${r.findings.length === 1 ? "" : "s"}:`,
    ...r.findings.map(
      (f, i) =>
        `  ${String(i + 1).padStart(3)}. ${f.kind.padEnd(12)} at ${f.xMm.toFixed(2)}, ${f.yMm.toFixed(2)} mm, ` +
        `${f.wMm.toFixed(2)} × ${f.hMm.toFixed(2)} mm (${f.areaMm2.toFixed(2)} mm²), ΔE00 mean ${f.deltaE00Mean.toFixed(1)} ` +
        `max ${f.deltaE00Max.toFixed(1)}${f.up === null ? "" : `, up ${f.up}`}`,
    ),
    `Timings (ms): ${Object.entries(r.timingsMs).map(([k, v]) => `${k} ${Math.round(v)}`).join(", ")}`,
  ];
  return lines.join("\n") + "\n";
}

const DPI_SOURCE: Record<string, string> = {
  file: "from the file",
  caller: "as given",
  measured: "measured: the file does not say",
};

/**
 * The resolution to compare at for a scan of `scanDpi`: the scan's own, but not above COMPARISON_MAX_DPI (the
 * smallest defect a profile names, 0.2 mm, is still 2.4 px there; more only costs time and memory).
 */
export function comparisonDpi(scanDpi: number): number {
  return Math.min(COMPARISON_MAX_DPI, Math.max(MIN_DPI, Math.round(scanDpi)));
}
const KIND_COLOUR: Record<Finding["kind"], string> = {
  extra_ink: "#d0021b",
  missing_ink: "#0057d9",
  colour_shift: "#f5a000",
  changed_text: "#7b2cbf",
  streak: "#008a5e",
};

/** The artwork with a box around every finding, written whole or not at all (temporary file, then rename). */
async function writeAnnotated(out: string, artwork: ArtworkRaster, findings: Finding[]): Promise<void> {
  const k = artwork.dpi / 25.4;
  const stroke = Math.max(2, Math.round(artwork.dpi / 100));
  const pad = stroke * 2;
  const boxes = findings.map((f, i) => {
    const x = Math.max(0, f.xMm * k - pad), y = Math.max(0, f.yMm * k - pad);
    const colour = KIND_COLOUR[f.kind];
    return (
      `<rect x="${x.toFixed(1)}" y="${y.toFixed(1)}" width="${(f.wMm * k + 2 * pad).toFixed(1)}" height="${(f.hMm * k + 2 * pad).toFixed(1)}" ` +
      `fill="none" stroke="${colour}" stroke-width="${stroke}"/>` +
      `<text x="${x.toFixed(1)}" y="${Math.max(12 * stroke, y - stroke).toFixed(1)}" font-family="sans-serif" font-size="${12 * stroke}" fill="${colour}">${i + 1}</text>`
    );
  });
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${artwork.width}" height="${artwork.height}">${boxes.join("")}</svg>`;
  const png = await sharp(artwork.data, { raw: { width: artwork.width, height: artwork.height, channels: 4 } })
    .composite([{ input: Buffer.from(svg), top: 0, left: 0 }])
    .png({ compressionLevel: 6 })
    .toBuffer();
  const temp = path.join(path.dirname(out), `.${path.basename(out)}.${process.pid}.tmp`);
  try {
    await writeFile(temp, png);
    await rename(temp, out);
  } catch (err) {
    await rm(temp, { force: true });
    throw new ImagingError("annotate_failed", `Cannot write ${out}: ${(err as Error).message}.`);
  }
}

if (import.meta.url === `file://${process.argv[1]}` || process.argv[1]?.endsWith("lib/imaging/cli.ts")) {
  const code = await runInspect(process.argv.slice(2), {
    stdout: (s) => process.stdout.write(s),
    stderr: (s) => process.stderr.write(s),
  });
  process.exitCode = code;
}
