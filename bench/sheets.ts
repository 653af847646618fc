// Benchmark sheets: invented carton artwork (tests/support/carton.ts), simulated scans with planted defects
// (tests/support/simulator), and the rule that matches findings to the planted truth.
import { rasterisePage } from "../lib/imaging/rasterise/rasterise";
import type { ArtworkRaster, Finding, RectMm } from "../lib/imaging/types";
import { makeCartonPdf, type CartonLayout, type CartonOptions } from "../tests/support/carton";
import { simulateSheet, type SimulatedSheet } from "../tests/support/simulator/index";
import type { DefectSpec, DefectTruth } from "../tests/support/simulator/defects";
import { seeded, type Random } from "../tests/support/simulator/random";

export interface SheetSpec {
  carton: CartonOptions;
  dpi: number;
  seed: number;
  /** Plant defects (and a changed word); a clean sheet otherwise. */
  defects: boolean;
  /** Lay the sheet on the scanner glass slightly turned, shifted and scaled; the scan is in the artwork's grid otherwise. */
  onGlass: boolean;
}

export interface BenchSheet {
  artwork: ArtworkRaster;
  layout: CartonLayout;
  sheet: SimulatedSheet;
  /** Sheet-number box grown by 1 mm: variable data, excluded from inspection. */
  excludedMm: RectMm[];
  /** Background of each truth, in the order of sheet.truth ("paper", "panel", "tint", "text"). */
  backgrounds: string[];
}

/** Dot diameters planted on every defect sheet (mm), each on white paper, the dark panel and the tint. */
export const DOT_SIZES_MM = [0.2, 0.3, 0.5, 1.0];
export const VOID_SIZES_MM = [0.3, 0.5, 1.0];
/** Hue turn of the colour-shifted patch on the tint (chroma about 22): about ΔE*ab 7.5. */
export const COLOUR_SHIFT_HUE_DEG = 20;

/** A flatbed scan of an offset sheet, varied a little per sheet (invented figures, not measurements). */
function photometry(random: Random) {
  const jitter = (v: number, spread: number) => v + (random() * 2 - 1) * spread;
  return {
    press: {
      density: jitter(1.03, 0.03),
      paperWhite: [jitter(246, 2), jitter(245, 2), jitter(240, 2)] as [number, number, number],
      cast: [jitter(1, 0.01), 1, jitter(1, 0.01)] as [number, number, number],
      crossTalk: 0.02,
    },
    scanner: { gamma: jitter(1.02, 0.02), blurMm: 0.04, noise: 1.5, jpegQuality: 92 },
  };
}

const artworkCache = new Map<string, { artwork: ArtworkRaster; layout: CartonLayout }>();

async function render(carton: CartonOptions, dpi: number) {
  const key = JSON.stringify([carton, dpi]);
  let hit = artworkCache.get(key);
  if (!hit) {
    const { pdf, layout } = await makeCartonPdf(carton);
    const raster = await rasterisePage(pdf, { dpi });
    hit = { artwork: raster, layout };
    if (artworkCache.size > 4) artworkCache.clear();
    artworkCache.set(key, hit);
  }
  return hit;
}

/** Builds one simulated sheet; the printed sheet carries its own sheet number (and the changed word). */
export async function makeSheet(spec: SheetSpec): Promise<BenchSheet> {
  const random = seeded(spec.seed);
  const { artwork, layout } = await render(spec.carton, spec.dpi);
  const changedWord = spec.defects ? { up: layout.ups.rows * layout.ups.columns } : undefined;
  const printed = await render({ ...spec.carton, sheetNumber: String(1000 + spec.seed), changedWord }, spec.dpi);
  const planned = spec.defects ? planDefects(printed.layout, random) : [];
  const defects = planned.map((p) => p.defect);
  const backgrounds = planned.map((p) => p.background);
  const geometry = spec.onGlass
    ? { rotationDeg: (random() * 2 - 1) * 0.6, scale: 1 + (random() * 2 - 1) * 0.001, marginMm: 6 + random() * 4 }
    : undefined;
  const sheet = await simulateSheet(artwork, { printed: printed.artwork, defects, geometry, photometric: photometry(random), seed: spec.seed });
  if (changedWord && printed.layout.changedWordMm) {
    sheet.truth.push({ type: "changed_word", boxMm: printed.layout.changedWordMm, kind: null });
    backgrounds.push("text");
  }
  const box = layout.sheetNumberMm;
  const excludedMm = box ? [{ x: box.x - 1, y: box.y - 1, w: box.w + 2, h: box.h + 2 }] : [];
  return { artwork, layout, sheet, excludedMm, backgrounds };
}

/** Dots of every size on three backgrounds, voids, a scratch and a colour shift, spread over the ups. */
function planDefects(layout: CartonLayout, random: Random): { defect: DefectSpec; background: string }[] {
  const ups = layout.upParts;
  const placed: { x: number; y: number }[] = [];
  const pick = (area: RectMm): { x: number; y: number } => {
    for (let attempt = 0; attempt < 200; attempt++) {
      const p = { x: area.x + 2 + random() * (area.w - 4), y: area.y + 2 + random() * (area.h - 4) };
      if (placed.every((q) => Math.hypot(q.x - p.x, q.y - p.y) > 6)) {
        placed.push(p);
        return p;
      }
    }
    throw new Error("No room left to plant a defect.");
  };
  const up = (i: number) => ups[i % ups.length];
  // Backgrounds: the lower part of the dark panel (below its type), the plain tint, and white paper in the
  // top margin of the sheet.
  const panel = (i: number) => {
    const p = up(i).panel;
    return { x: p.x, y: p.y + p.h * 0.62, w: p.w, h: p.h * 0.38 };
  };
  // Plain tint: between the lower panel's large type and its seal.
  const tint = (i: number) => {
    const { lowerPanel: t, lowerType: type, seal } = up(i);
    if (!t || !type || !seal) throw new Error("The benchmark sheet's ups are too short for a tint panel.");
    const x0 = type.x + type.w + 1;
    return { x: x0, y: t.y, w: seal.x - 1 - x0, h: t.h };
  };
  const paper = { x: 5, y: 1, w: layout.widthMm - 10, h: Math.max(5, layout.ups.areaMm.y - 1.5) };
  const defects: { defect: DefectSpec; background: string }[] = [];
  // The colour-shifted patch first; its corners and centre then keep the other defects 6 mm away.
  const t = tint(0);
  const rectMm = { x: t.x + 1, y: t.y + 1, w: Math.min(12, t.w - 2), h: Math.min(8, t.h - 2) };
  for (const [fx, fy] of [[0, 0], [1, 0], [0, 1], [1, 1], [0.5, 0.5]]) placed.push({ x: rectMm.x + fx * rectMm.w, y: rectMm.y + fy * rectMm.h });
  defects.push({ defect: { type: "colour_shift", rectMm, hueDeg: COLOUR_SHIFT_HUE_DEG }, background: "tint" });
  let n = 1;
  for (const d of DOT_SIZES_MM) {
    for (const [background, area] of [["paper", paper], ["panel", panel(n++)], ["tint", tint(n++)]] as const) {
      const p = pick(area);
      defects.push({ defect: { type: "dot", xMm: p.x, yMm: p.y, diameterMm: d }, background });
    }
  }
  for (const d of VOID_SIZES_MM) {
    const background = n % 2 ? "panel" : "tint";
    const p = pick(background === "panel" ? panel(n) : tint(n));
    n++;
    defects.push({ defect: { type: "void", xMm: p.x, yMm: p.y, diameterMm: d }, background });
  }
  const s = pick(panel(n++));
  defects.push({ defect: { type: "scratch", x0Mm: s.x - 2, y0Mm: s.y, x1Mm: s.x + 2, y1Mm: s.y + 0.8, widthMm: 0.2 }, background: "panel" });
  return defects;
}

export interface SheetScore {
  /** Per truth: found or not, with its type and size. */
  truths: { type: DefectTruth["type"]; sizeMm: number; background: string; found: boolean }[];
  falseFindings: number;
}

const overlaps = (a: RectMm, b: RectMm, marginMm: number) =>
  a.x < b.x + b.w + marginMm && b.x < a.x + a.w + marginMm && a.y < b.y + b.h + marginMm && b.y < a.y + a.h + marginMm;

/** A truth is found when a finding's box touches it (0.5 mm slack); a finding touching no truth is false. */
export function score(findings: Finding[], truth: DefectTruth[], backgrounds: string[]): SheetScore {
  const boxes = findings.map((f) => ({ x: f.xMm, y: f.yMm, w: f.wMm, h: f.hMm }));
  return {
    truths: truth.map((t, i) => ({ type: t.type, sizeMm: Math.min(t.boxMm.w, t.boxMm.h), background: backgrounds[i] ?? "", found: boxes.some((b) => overlaps(b, t.boxMm, 0.5)) })),
    falseFindings: boxes.filter((b) => !truth.some((t) => overlaps(b, t.boxMm, 1))).length,
  };
}
