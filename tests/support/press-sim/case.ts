// One simulated case from its seed: design, imposition, the press (Ghostscript's separations, defects, screens,
// inks, board) and the scanner, with the truth. Everything random comes from the seed.
import { plantDefect, type DefectKind, type PlantedDefect } from "./defects";
import { encodeScan, extension, SCAN_FORMATS, type ScanFormat } from "./encode";
import { renderSeparations, type Separations } from "./ghostscript";
import { PROCESS_ANGLES, type Screen } from "./halftone";
import { imposeSheet, sheetSize, type SheetLayout } from "./impose";
import { inkSet } from "./inks";
import type { BoxMm, TextEdit, TextItem } from "./painter";
import { seeded, type Random } from "./random";
import { scanSheet, type Placement, type ScannerSettings } from "./scanner";
import { seedSet } from "./seeds";
import { TEMPLATES, type Template } from "./templates";

export interface CaseOptions {
  /** Force a scan resolution (300, 200 or 100); otherwise chosen from the seed. */
  dpi?: number;
  /** Share of placed cases printed without defects. */
  cleanShare?: number;
}

export interface TruthDefect {
  kind: DefectKind;
  cause: string;
  /** mm from the artwork's trim-box top-left. */
  box_mm: BoxMm;
  area_mm2: number;
  size_mm: number;
  deltaE00?: number;
}

export interface Truth {
  seed: number;
  set: "training" | "heldout";
  template: string;
  ups: { rows: number; columns: number; count: number };
  sheet_mm: { w: number; h: number };
  trim_on_sheet_mm: BoxMm;
  dpi: number;
  print_dpi: number;
  expect: "place" | "refuse";
  refuse_reason?: "wrong_artwork" | "blank_sheet";
  clean: boolean;
  partial: boolean;
  scan_file: string;
  format: ScanFormat;
  jpeg_quality?: number;
  placement: Placement;
  screens: Screen[];
  dot_gain_50: number;
  scanner: Omit<ScannerSettings, "dpi">;
  defects: TruthDefect[];
  /** Defects only partly on the scan: neither required nor counted as false when found. */
  ignored: TruthDefect[];
}

export interface CaseFiles {
  artworkPdf: Uint8Array;
  scan: Buffer;
  truth: Truth;
}

const round = (v: number, d = 3) => Math.round(v * 10 ** d) / 10 ** d;
const roundBox = (b: BoxMm): BoxMm => ({ x: round(b.x), y: round(b.y), w: round(b.w), h: round(b.h) });

interface Plan {
  template: Template;
  layout: SheetLayout;
  dpi: number;
}

/** Ups and sheet: B2-sized many-up sheets at 100 dpi, sheets up to about A4–A3 at 200 and 300 dpi. */
function plan(rng: Random, dpi: number): Plan {
  const large = dpi <= 100;
  const pool = TEMPLATES.filter((t) => (large ? true : t.widthMm * t.heightMm <= 180 * 70 + 1));
  const template = rng.pick(pool);
  const gutterMm = rng.range(3, 6), marginMm = rng.range(12, 18), barMm = 8;
  const maxW = large ? 707 : rng.pick([230, 300, 330]), maxH = large ? 500 : rng.pick([200, 250]);
  const fit = (size: number, max: number) => Math.max(1, Math.floor((max - 2 * marginMm + gutterMm) / (size + gutterMm)));
  let columns = fit(template.widthMm, maxW), rows = fit(template.heightMm, maxH - barMm);
  while (rows * columns > 48) {
    if (rows > columns) rows--;
    else columns--;
  }
  if (!large) {
    // Smaller sheets vary from one up to what fits.
    columns = rng.int(1, columns);
    rows = rng.int(1, rows);
  }
  return { template, layout: { rows, columns, gutterMm, marginMm, barMm }, dpi };
}

function changedText(item: TextItem, rng: Random): string {
  const words = item.text.split(" ");
  const candidates = words.map((w, i) => ({ w, i })).filter(({ w }) => w.length >= 3);
  const { w, i } = candidates.length ? rng.pick(candidates) : { w: words[0], i: 0 };
  let to: string;
  if (/\d/.test(w)) to = w.replace(/\d/, (d) => String((Number(d) + rng.int(1, 8)) % 10));
  else {
    const chars = w.split("");
    const at = rng.int(0, chars.length - 1);
    const letters = "aeiourstnlm";
    let c = rng.pick(letters.split(""));
    if (c.toLowerCase() === chars[at].toLowerCase()) c = c === "a" ? "o" : "a";
    chars[at] = chars[at] === chars[at].toUpperCase() ? c.toUpperCase() : c;
    to = chars.join("");
  }
  words[i] = to;
  return words.join(" ");
}

export async function makeCase(seed: number, opts: CaseOptions = {}): Promise<CaseFiles> {
  const set = seedSet(seed);
  if (!set) throw new Error(`Seed ${seed} is in neither range`);
  const rng = seeded(seed);
  // The mix follows the seed's digits, so any run of ten or so seeds has some of each: one in ten is to be
  // refused (wrong artwork or a blank sheet), one in seven a B2 many-up sheet at 100 dpi, one in six partial.
  const pick = rng.pick([300, 200]);
  const dpi = opts.dpi ?? (seed % 7 === 3 ? 100 : pick);
  const expect: Truth["expect"] = seed % 10 === 0 ? "refuse" : "place";
  const refuseReason = expect === "refuse" ? (Math.floor(seed / 10) % 2 === 1 ? "wrong_artwork" : "blank_sheet") : undefined;
  const clean = rng.chance(opts.cleanShare ?? 0.4) || expect === "refuse";
  const partial = expect === "place" && seed % 6 === 1;
  const p = plan(rng, dpi);
  const designSeed = seed * 7919 + 13;
  const sheet = await imposeSheet(p.template, p.layout, designSeed);
  const { widthMm, heightMm } = sheetSize(p.template, p.layout);

  // Defects: one text edit at most, from a second rendering; the rest go into the separations.
  const kinds: Exclude<DefectKind, "changed_text">[] = [];
  let edit: TextEdit | undefined;
  let editTruth: PlantedDefect | undefined;
  if (!clean) {
    const n = rng.int(1, 4);
    for (let i = 0; i < n; i++) {
      const kind = rng.pick(["extra_ink", "extra_ink", "missing_ink", "streak", "colour_shift", "changed_text"] as const);
      if (kind === "changed_text" && !edit) {
        const item = rng.pick(sheet.texts.filter((t) => t.text.trim().length >= 3));
        const omit = rng.chance(0.35);
        edit = { up: item.up, index: item.index, action: omit ? "omit" : "change", to: omit ? undefined : changedText(item, rng) };
        const box = omit ? item.box : { ...item.box, w: item.box.w * Math.max(1, (edit.to!.length + 1) / item.text.length) };
        editTruth = { kind: "changed_text", cause: omit ? "missing text" : "changed word", box, areaMm2: box.w * box.h, sizeMm: Math.min(box.w, box.h) };
      } else if (kind !== "changed_text") kinds.push(kind);
    }
    if (kinds.length === 0 && !edit) kinds.push("extra_ink");
  }

  const printDpi = dpi >= 200 ? 600 : 300;
  let printedPdf = sheet.pdf;
  if (edit) printedPdf = (await imposeSheet(p.template, p.layout, designSeed, edit)).pdf;
  let sep: Separations;
  let artworkPdf = sheet.pdf;
  if (refuseReason === "blank_sheet") {
    const w = Math.round((widthMm * printDpi) / 25.4), h = Math.round((heightMm * printDpi) / 25.4);
    sep = { width: w, height: h, dpi: printDpi, cmyk: new Uint8Array(w * h * 4) };
  } else {
    sep = await renderSeparations(printedPdf, printDpi);
    if (refuseReason === "wrong_artwork") {
      // The scan is of this sheet; the artwork given is another design.
      const other = TEMPLATES.filter((t) => t.name !== p.template.name && t.widthMm * t.heightMm <= p.template.widthMm * p.template.heightMm * 2.5);
      const t = rng.pick(other.length ? other : TEMPLATES);
      artworkPdf = (await imposeSheet(t, { ...p.layout, rows: 1, columns: 1 }, designSeed + 1)).pdf;
    }
  }

  const dotGain = rng.range(0.1, 0.18);
  const inks = inkSet(dotGain);
  const planted = kinds.map((k) => plantDefect(sep, sheet.ups, k, rng, inks));
  if (editTruth) planted.push(editTruth);

  const lpi = rng.range(150, 175);
  const screens: [Screen, Screen, Screen, Screen] = [
    { lpi, angleDeg: PROCESS_ANGLES.c }, { lpi, angleDeg: PROCESS_ANGLES.m }, { lpi, angleDeg: PROCESS_ANGLES.y }, { lpi, angleDeg: PROCESS_ANGLES.k },
  ];
  const paperL = rng.range(0.84, 0.91);
  const press = {
    sep, sheetWidthMm: widthMm, sheetHeightMm: heightMm, inks, screens,
    paper: [paperL, paperL * rng.range(0.985, 1), paperL * rng.range(0.94, 0.99)] as [number, number, number],
    fibre: { cellX: 0.1, cellY: 0.35, amplitude: rng.range(0.005, 0.01), seed: seed * 3 + 1 },
    mottle: { cellX: 1.5, cellY: 1.5, amplitude: rng.range(0.005, 0.01), seed: seed * 3 + 2 },
    inkMottle: { cellX: 1.2, cellY: 1.2, amplitude: rng.range(0.01, 0.02), seed: seed * 3 + 3 },
  };

  const place = placement(rng, widthMm, heightMm, partial, dpi);
  let falloff = { ax: rng.range(-0.02, 0.02), ay: rng.range(-0.02, 0.02), q: rng.range(-0.02, 0.02) };
  const peak = Math.abs(falloff.ax) + Math.abs(falloff.ay) + Math.abs(falloff.q) * (2 / 3);
  if (peak > 0.03) falloff = { ax: (falloff.ax * 0.03) / peak, ay: (falloff.ay * 0.03) / peak, q: (falloff.q * 0.03) / peak };
  const blackLid = rng.chance(0.2);
  const scanner: ScannerSettings = {
    dpi,
    samples: dpi >= 300 ? 3 : dpi >= 200 ? 4 : 6,
    blurSigmaPx: rng.range(0.5, 1.2),
    falloff,
    cast: [rng.range(0.97, 1.03), rng.range(0.98, 1.02), rng.range(0.96, 1.04)],
    gamma: [rng.range(0.94, 1.06), rng.range(0.94, 1.06), rng.range(0.94, 1.06)],
    noise: rng.range(0.003, 0.008),
    lid: blackLid ? [0.02, 0.02, 0.022] : [0.8, 0.8, 0.78],
  };
  const raster = scanSheet(press, place, scanner, rng);
  const format = rng.pick(SCAN_FORMATS);
  const quality = rng.int(85, 95);
  const scan = await encodeScan(raster, format, quality);

  // Truth in trim-box mm; a defect counts only when the whole of it is on the scan.
  const toTrim = (d: PlantedDefect): TruthDefect => ({
    kind: d.kind, cause: d.cause,
    box_mm: roundBox({ x: d.box.x - sheet.trim.x, y: d.box.y - sheet.trim.y, w: d.box.w, h: d.box.h }),
    area_mm2: round(d.areaMm2), size_mm: round(d.sizeMm),
    ...(d.deltaE00 === undefined ? {} : { deltaE00: d.deltaE00 }),
  });
  const onScan = (b: BoxMm) => [[b.x, b.y], [b.x + b.w, b.y], [b.x, b.y + b.h], [b.x + b.w, b.y + b.h]].every(([x, y]) => visible(place, widthMm, heightMm, x, y, 1));
  const defects = planted.filter((d) => onScan(d.box)).map(toTrim);
  const ignored = planted.filter((d) => !onScan(d.box)).map(toTrim);
  const { dpi: _dpi, ...scannerTruth } = scanner;
  void _dpi;
  const truth: Truth = {
    seed, set, template: p.template.name,
    ups: { rows: p.layout.rows, columns: p.layout.columns, count: p.layout.rows * p.layout.columns },
    sheet_mm: { w: round(widthMm), h: round(heightMm) },
    trim_on_sheet_mm: roundBox(sheet.trim),
    dpi, print_dpi: printDpi, expect,
    ...(refuseReason ? { refuse_reason: refuseReason } : {}),
    clean: clean || defects.length + ignored.length === 0, partial,
    scan_file: `scan.${extension(format)}`, format,
    ...(format.startsWith("jpeg") ? { jpeg_quality: quality } : {}),
    placement: { ...place, angleDeg: round(place.angleDeg, 4) },
    screens, dot_gain_50: round(dotGain), scanner: scannerTruth,
    defects, ignored,
  };
  return { artworkPdf, scan, truth };
}

/** Sheet mm → glass mm, and whether that point is on the glass with `inset` mm to spare. */
function visible(pl: Placement, w: number, h: number, x: number, y: number, inset: number): boolean {
  const phi = ((pl.quarter * 90 + pl.angleDeg) * Math.PI) / 180, c = Math.cos(phi), s = Math.sin(phi);
  const dx = x - w / 2, dy = y - h / 2;
  const gx = c * dx - s * dy + pl.centreXMm, gy = s * dx + c * dy + pl.centreYMm;
  return gx >= inset && gy >= inset && gx <= pl.glassWidthMm - inset && gy <= pl.glassHeightMm - inset;
}

function placement(rng: Random, w: number, h: number, partial: boolean, dpi: number): Placement {
  const quarter = rng.int(0, 3) as Placement["quarter"];
  const angleDeg = rng.range(-1.5, 1.5);
  const phi = ((quarter * 90 + angleDeg) * Math.PI) / 180;
  const bw = Math.abs(w * Math.cos(phi)) + Math.abs(h * Math.sin(phi)), bh = Math.abs(w * Math.sin(phi)) + Math.abs(h * Math.cos(phi));
  if (!partial) {
    const ml = rng.range(3, 15), mr = rng.range(3, 15), mt = rng.range(3, 15), mb = rng.range(3, 15);
    return { quarter, angleDeg, glassWidthMm: bw + ml + mr, glassHeightMm: bh + mt + mb, centreXMm: ml + bw / 2, centreYMm: mt + bh / 2 };
  }
  // A glass smaller than the sheet: the scan shows one corner or side of it (with its edge) and part of the rest.
  const gw = bw * rng.range(0.5, 0.8), gh = bh * rng.range(0.55, 0.85);
  const edgeX = rng.pick([-1, 1]), edgeY = rng.pick([-1, 0, 1]);
  const m = rng.range(3, 10);
  const cx = edgeX < 0 ? m + bw / 2 : gw - m - bw / 2;
  const cy = edgeY < 0 ? m + bh / 2 : edgeY > 0 ? gh - m - bh / 2 : gh / 2 + rng.range(-0.1, 0.1) * bh;
  void dpi;
  return { quarter, angleDeg, glassWidthMm: gw, glassHeightMm: gh, centreXMm: cx, centreYMm: cy };
}
