// The whole engine on simulated press sheets: an invented carton artwork, printed with planted defects, put
// on a simulated scanner glass (turned, scaled), with press and scanner photometry, then inspected.
// The defects, their sizes and that a felt-tip dot of 0.3 mm must be found are facts of the trade (common
// practice, no published source); the PNG signature is from ISO/IEC 15948 (PNG), section 5.2.
import { beforeAll, describe, expect, it } from "vitest";
import { PNG } from "pngjs";
import { inspectSheet, identityAlignment } from "@/lib/imaging/inspect";
import { getProfile } from "@/lib/imaging/profiles";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import { ImagingError, type ArtworkRaster, type Finding, type InspectionProgress, type RectMm } from "@/lib/imaging/types";
import { makeCartonPdf, type CartonLayout } from "@/tests/support/carton";
import type { DefectSpec } from "@/tests/support/simulator/defects";
import { simulateSheet, type SimulateOptions } from "@/tests/support/simulator/index";

const DPI = 200;
/** Press drift and a flatbed scan of it (invented, plausible figures). */
const PHOTOMETRY: SimulateOptions["photometric"] = {
  press: { density: 1.08, paperWhite: [246, 244, 238], cast: [1, 0.99, 0.96], crossTalk: 0.03, halftone: { lpi: 150, angleDeg: 15, amplitude: 0.1 } },
  scanner: { gamma: 1.05, blurMm: 0.08, noise: 2.5, jpegQuality: 92 },
};

let artwork: ArtworkRaster;
let layout: CartonLayout;

beforeAll(async () => {
  const made = await makeCartonPdf({ widthMm: 150, heightMm: 110, rows: 1, columns: 2 });
  layout = made.layout;
  artwork = await rasterisePage(made.pdf, { dpi: DPI });
});

function overlaps(f: Finding, box: RectMm, slackMm = 0.5): boolean {
  return f.xMm <= box.x + box.w + slackMm && box.x <= f.xMm + f.wMm + slackMm && f.yMm <= box.y + box.h + slackMm && box.y <= f.yMm + f.hMm + slackMm;
}

async function inspect(opts: SimulateOptions & { profile?: string; ups?: boolean; crops?: boolean; excluded?: RectMm[] }) {
  const sim = await simulateSheet(artwork, { photometric: PHOTOMETRY, geometry: { rotationDeg: 1.3, scale: 1.002 }, ...opts });
  const profile = { ...getProfile(opts.profile ?? "standard-food"), excludedAreasMm: opts.excluded ?? [] };
  const result = await inspectSheet({ artwork, scan: sim.scan, profile, ups: opts.ups ? layout.ups : undefined, crops: opts.crops });
  return { sim, result };
}

describe("inspectSheet on simulated sheets", () => {
  it("finds felt-tip dots of 0.3–2 mm, a void and a scratch in solids, and a colour-shifted patch", async () => {
    const [up1, up2] = layout.upParts;
    const defects: DefectSpec[] = [
      { type: "dot", xMm: 30, yMm: 100, diameterMm: 0.3 },
      { type: "dot", xMm: 40, yMm: 103, diameterMm: 0.5 },
      { type: "dot", xMm: 50, yMm: 105, diameterMm: 1 },
      { type: "dot", xMm: up2.panel.x + 40, yMm: up2.panel.y + 19, diameterMm: 2 },
      { type: "void", xMm: up1.panel.x + 10, yMm: up1.panel.y + 18, diameterMm: 0.8 },
      { type: "scratch", x0Mm: up2.panel.x + 5, y0Mm: up2.panel.y + 15, x1Mm: up2.panel.x + 25, y1Mm: up2.panel.y + 20, widthMm: 0.15 },
      { type: "colour_shift", rectMm: { x: up2.lowerPanel!.x + 2, y: up2.lowerPanel!.y + 1, w: 6, h: 6 }, hueDeg: 12 },
    ];
    const { sim, result } = await inspect({ defects, seed: 11 });
    for (const truth of sim.truth) {
      const hit = result.findings.find((f) => overlaps(f, truth.boxMm));
      expect(hit, `${truth.type} at ${JSON.stringify(truth.boxMm)}`).toBeDefined();
      if (truth.kind) expect(hit!.kind, truth.type).toBe(truth.kind);
    }
    // Nothing but the planted defects.
    const stray = result.findings.filter((f) => !sim.truth.some((t) => overlaps(f, t.boxMm)));
    expect(stray).toEqual([]);
    expect(result.timingsMs).toMatchObject({ align: expect.any(Number), normalise: expect.any(Number), compare: expect.any(Number), findings: expect.any(Number) });
    // The passes lie inside the normalise and compare stages.
    const p = result.passesMs;
    expect(Object.keys(p)).toEqual(["colourFit", "scannerBlur", "warp", "lowPass", "colourMap", "screen", "cielab"]);
    expect(p.colourFit + p.scannerBlur + p.warp + p.lowPass + p.colourMap).toBeLessThanOrEqual(result.timingsMs.normalise + 0.5);
    expect(p.screen + p.cielab).toBeLessThanOrEqual(result.timingsMs.compare + 0.5);
  });

  it("finds a changed word in 6 pt text", async () => {
    const changed = await makeCartonPdf({ widthMm: 150, heightMm: 110, rows: 1, columns: 2, changedWord: { up: 2 } });
    const printed = await rasterisePage(changed.pdf, { dpi: DPI });
    const box = changed.layout.changedWordMm!;
    const { result } = await inspect({ printed, seed: 12 });
    expect(result.findings.some((f) => overlaps(f, box))).toBe(true);
    expect(result.findings.filter((f) => !overlaps(f, box))).toEqual([]);
  });

  it("finds a one-digit change (250 → 350 ml) in 6 pt text on a 297 × 210 mm sheet of six ups at 300 dpi", { timeout: 120_000 }, async () => {
    const carton = { widthMm: 297, heightMm: 210, rows: 2, columns: 3 };
    const [approved, changed] = await Promise.all([
      makeCartonPdf(carton),
      makeCartonPdf({ ...carton, changedWord: { up: 6, replacement: "350" } }),
    ]);
    expect(changed.layout.changedWord).toMatchObject({ from: "250", to: "350" });
    const [art300, printed] = await Promise.all([rasterisePage(approved.pdf, { dpi: 300 }), rasterisePage(changed.pdf, { dpi: 300 })]);
    const box = changed.layout.changedWordMm!;
    // A lighter scan than the other tests': no halftone, the blur and noise of a good flatbed.
    const photometric: SimulateOptions["photometric"] = {
      press: { density: 1.03, paperWhite: [246, 245, 240], cast: [1, 1, 0.99], crossTalk: 0.02 },
      scanner: { gamma: 1.02, blurMm: 0.04, noise: 1.5, jpegQuality: 92 },
    };
    for (const [seed, rotationDeg] of [[21, 0.4], [22, -0.3]] as const) {
      const sim = await simulateSheet(art300, { printed, photometric, geometry: { rotationDeg, scale: 1.0005, marginMm: 8 }, seed });
      const result = await inspectSheet({ artwork: art300, scan: sim.scan, profile: getProfile("standard-food") });
      expect(result.findings.some((f) => overlaps(f, box)), `seed ${seed}`).toBe(true);
      expect(result.findings.filter((f) => !overlaps(f, box)), `seed ${seed}`).toEqual([]);
    }
  });

  it.each([1, 2, 3])("reports no findings on a clean sheet (seed %i: turned, scaled, noisy, tone drift, JPEG)", async (seed) => {
    const { result } = await inspect({
      seed,
      geometry: { rotationDeg: [0.7, -1.8, 90.4][seed - 1], scale: [1.001, 0.998, 1.003][seed - 1] },
    });
    expect(result.findings).toEqual([]);
  });

  it("reports a uniform drift once, as drift.deltaE00, not as findings", async () => {
    const strong = { ...PHOTOMETRY, press: { ...PHOTOMETRY!.press, density: 1.2, cast: [0.97, 1, 0.9] as [number, number, number] } };
    const { result } = await inspect({ seed: 4, photometric: strong });
    expect(result.drift.deltaE00).toBeGreaterThan(4);
    expect(result.findings).toEqual([]);
  });

  it("ignores excluded areas and gives the up of each finding", async () => {
    const defects: DefectSpec[] = [
      { type: "dot", xMm: 40, yMm: 60, diameterMm: 1 },
      { type: "dot", xMm: 110, yMm: 60, diameterMm: 1 },
    ];
    const excluded = [{ x: 38, y: 58, w: 4, h: 4 }];
    const { result } = await inspect({ defects, seed: 5, ups: true, excluded, crops: true });
    expect(result.findings).toHaveLength(1);
    const f = result.findings[0];
    expect(overlaps(f, { x: 109.5, y: 59.5, w: 1, h: 1 })).toBe(true);
    expect(f.up).toBe(2);
    // Crops are PNG files (signature of ISO/IEC 15948, 5.2) that decode to the same size.
    for (const png of [f.crops!.artwork, f.crops!.scan, f.crops!.difference]) {
      expect([...png.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
      const decoded = PNG.sync.read(png);
      expect(decoded.width).toBeGreaterThan(20);
      expect(decoded.width).toBe(PNG.sync.read(f.crops!.artwork).width);
    }
  });

  it("gives each of two sheets inspected at once in one thread the findings it gets alone (band buffers are lent, not shared)", async () => {
    const dotted = await simulateSheet(artwork, { photometric: PHOTOMETRY, geometry: { rotationDeg: 0.8 }, seed: 12, defects: [{ type: "dot", xMm: 40, yMm: 60, diameterMm: 1 }] });
    const clean = await simulateSheet(artwork, { photometric: PHOTOMETRY, geometry: { rotationDeg: -0.6 }, seed: 13 });
    const profile = getProfile("standard-food");
    const run = (scan: typeof clean.scan) => inspectSheet({ artwork, scan, profile }).then((r) => ({ findings: r.findings, drift: r.drift }));
    const alone = [await run(dotted.scan), await run(clean.scan)];
    expect(alone[0].findings).toHaveLength(1);
    expect(alone[1].findings).toEqual([]);
    expect(await Promise.all([run(dotted.scan), run(clean.scan)])).toEqual(alone);
  });

  it("reports progress through the stages and accepts a known alignment", async () => {
    const sim = await simulateSheet(artwork, { seed: 6 });
    const seen: InspectionProgress[] = [];
    const result = await inspectSheet({ artwork, scan: sim.scan, profile: getProfile("standard-food"), alignment: identityAlignment(artwork, sim.scan), onProgress: (p) => seen.push(p) });
    expect(result.findings).toEqual([]);
    expect(seen[0].stage).toBe("align");
    expect(seen.at(-1)).toEqual({ stage: "findings", percent: 100 });
    for (let i = 1; i < seen.length; i++) expect(seen[i].percent).toBeGreaterThanOrEqual(seen[i - 1].percent);
  });

  it("refuses the scan of another artwork with scan_mismatch", async () => {
    const other = await makeCartonPdf({ widthMm: 150, heightMm: 110, rows: 2, columns: 1 });
    const otherRaster = await rasterisePage(other.pdf, { dpi: DPI });
    const sim = await simulateSheet(otherRaster, { seed: 7, geometry: { rotationDeg: 0.5 } });
    const run = inspectSheet({ artwork, scan: sim.scan, profile: getProfile("standard-food") });
    await expect(run).rejects.toBeInstanceOf(ImagingError);
    await expect(run).rejects.toMatchObject({ code: "scan_mismatch" });
  });

  it("refuses pixel data that does not match the stated size", async () => {
    const bad = { ...artwork, data: artwork.data.subarray(0, 100) };
    await expect(inspectSheet({ artwork: bad, scan: { ...artwork, dpiSource: "caller" }, profile: getProfile("standard-food") })).rejects.toMatchObject({ code: "bad_input" });
  });
});
