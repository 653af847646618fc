// Registration of simulated scans: the true artwork → scan map is known (tests/support/simulator/geometry.ts),
// so the error is measured, not guessed. Limits from the engine's requirement: ≤ 0.05° rotation, ≤ 0.05 %
// scale, ≤ 0.1 mm at the sheet's centre and corners (of the covered area when the scan sees part of the sheet).
// The artwork is the invented multi-up carton sheet of tests/support/carton.ts, rasterised at 100 dpi.
import { beforeAll, describe, expect, it } from "vitest";
import { alignScan, warpScanToArtwork } from "@/lib/imaging/align/align";
import { WarpBuffers } from "@/lib/imaging/align/warp";
import { apply, coveredRect } from "@/lib/imaging/align/affine";
import { pxRectToMm } from "@/lib/imaging/raster";
import { loadOpenCv } from "@/lib/imaging/align/opencv";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import { ImagingError, type Alignment, type ArtworkRaster, type RectMm, type ScanImage } from "@/lib/imaging/types";
import { makeCartonPdf } from "@/tests/support/carton";
import { applyPress, applyScanner } from "@/tests/support/simulator/photometric";
import { seeded } from "@/tests/support/simulator/random";
import { GREY_LID, placeOnGlass, WHITE_LID, type GlassOptions, type GlassScan } from "@/tests/support/simulator/geometry";

const DPI = 100;
let carton: ArtworkRaster;
let fifteenUp: ArtworkRaster;

beforeAll(async () => {
  carton = await rasterisePage((await makeCartonPdf({ widthMm: 297, heightMm: 210, rows: 2, columns: 3 })).pdf, { dpi: DPI });
  fifteenUp = await rasterisePage((await makeCartonPdf({ widthMm: 420, heightMm: 297, rows: 3, columns: 5, sheetNumberBox: false })).pdf, { dpi: DPI });
});

/** Worst distance (mm on the glass) between found and true scan positions at the centre and corners of `area`. */
function worstErrorMm(a: Alignment, sim: GlassScan, art: ArtworkRaster, area?: RectMm): number {
  const r = area ?? { x: 0, y: 0, w: (art.width * 25.4) / art.dpi, h: (art.height * 25.4) / art.dpi };
  const f = art.dpi / 25.4;
  const x0 = r.x * f, y0 = r.y * f, x1 = (r.x + r.w) * f - 1, y1 = (r.y + r.h) * f - 1;
  let worst = 0;
  for (const [x, y] of [[x0, y0], [x1, y0], [x0, y1], [x1, y1], [(x0 + x1) / 2, (y0 + y1) / 2]]) {
    const p = apply(a.artworkToScan, x, y), q = sim.scanPoint(x, y);
    worst = Math.max(worst, (Math.hypot(p[0] - q[0], p[1] - q[1]) * 25.4) / sim.scan.dpi);
  }
  return worst;
}

const angleDiff = (a: number, b: number) => Math.abs((((a - b + 540) % 360) + 360) % 360 - 180);

async function alignCase(art: ArtworkRaster, o: GlassOptions) {
  const sim = placeOnGlass(art, o);
  const t0 = performance.now();
  const { alignment } = await alignScan(art, sim.scan);
  return { sim, alignment, ms: performance.now() - t0 };
}

function expectAccurate(a: Alignment, sim: GlassScan, art: ArtworkRaster, o: GlassOptions, area?: RectMm) {
  const err = worstErrorMm(a, sim, art, area);
  expect(angleDiff(a.rotationDeg, o.rotationDeg ?? 0)).toBeLessThanOrEqual(0.05);
  expect(Math.abs(a.scale / (o.scale ?? 1) - 1)).toBeLessThanOrEqual(0.0005);
  expect(err).toBeLessThanOrEqual(0.1);
  expect(a.correlation).toBeGreaterThan(0.9);
  expect(a.residualMm).toBeLessThan(0.1);
  return err;
}

describe("the simulated scanner glass (the truth the other tests measure against)", () => {
  it("turns the sheet as OpenCV's getRotationMatrix2D does, and draws a dot where its map says", async () => {
    const cv = await loadOpenCv();
    const size = { w: (carton.width * 25.4) / DPI, h: (carton.height * 25.4) / DPI };
    const sim = placeOnGlass(carton, { rotationDeg: 2.5, scale: 1.02, sizeMm: size });
    // OpenCV's angle is counter-clockwise on screen; the glass turns clockwise for a positive angle.
    const ref = cv.getRotationMatrix2D(new cv.Point((carton.width - 1) / 2, (carton.height - 1) / 2), -2.5, 1.02);
    const m = Array.from(ref.data64F as Float64Array);
    ref.delete();
    sim.artworkToScan.forEach((v, i) => expect(v).toBeCloseTo(m[i], 9));

    // A black dot on white paper, turned a quarter and scanned at 150 dpi: its centroid.
    const page: ArtworkRaster = { ...carton, data: new Uint8ClampedArray(carton.data.length).fill(255) };
    const cx = 700.3, cy = 420.6;
    for (let y = 0; y < page.height; y++) for (let x = 0; x < page.width; x++) {
      if ((x - cx) ** 2 + (y - cy) ** 2 <= 36) page.data.fill(0, (y * page.width + x) * 4, (y * page.width + x) * 4 + 3);
    }
    let ax = 0, ay = 0, aw = 0;
    for (let y = 0; y < page.height; y++) for (let x = 0; x < page.width; x++) {
      const ink = 255 - page.data[(y * page.width + x) * 4];
      if (ink > 0) [ax, ay, aw] = [ax + ink * x, ay + ink * y, aw + ink];
    }
    const dot = placeOnGlass(page, { rotationDeg: 93, dpi: 150 });
    const [ex, ey] = apply(dot.artworkToScan, ax / aw, ay / aw);
    // Centroid of the ink in a window around the expected spot (all paper there, no lid).
    let sx = 0, sy = 0, sw = 0;
    for (let y = Math.round(ey) - 20; y <= Math.round(ey) + 20; y++) for (let x = Math.round(ex) - 20; x <= Math.round(ex) + 20; x++) {
      const ink = 255 - dot.scan.data[(y * dot.scan.width + x) * 4];
      [sx, sy, sw] = [sx + ink * x, sy + ink * y, sw + ink];
    }
    expect(Math.hypot(sx / sw - ex, sy / sw - ey)).toBeLessThan(0.1);
  });
});

describe("alignScan on simulated scans of a 6-up carton sheet", () => {
  const cases: [string, GlassOptions][] = [
    ["a small turn, +3°, off-centre on the glass", { rotationDeg: 3, sizeMm: { w: 330, h: 250 }, centreMm: { x: 170, y: 118 } }],
    ["a small turn, −2.6°, and 3 % larger", { rotationDeg: -2.6, scale: 1.03 }],
    ["−1.2° and 3 % smaller", { rotationDeg: -1.2, scale: 0.97 }],
    ["a quarter turn plus 1.7°, dark grey lid", { rotationDeg: 91.7, background: GREY_LID }],
    ["a half turn less 2.2°", { rotationDeg: 177.8, resampling: "bicubic" }],
    ["three quarter turns plus 0.6°, scanned at 150 dpi", { rotationDeg: 270.6, dpi: 150 }],
    ["scanned at 200 dpi, 2 % smaller, −0.8°", { rotationDeg: -0.8, scale: 0.98, dpi: 200 }],
    ["scanned at 72 dpi, +2.4°", { rotationDeg: 2.4, dpi: 72 }],
    ["a sheet much smaller than the glass, dark lid, in a corner", { rotationDeg: 1.3, background: GREY_LID, sizeMm: { w: 432, h: 305 }, centreMm: { x: 165, y: 120 } }],
  ];
  for (const [name, o] of cases) {
    it(name, async () => {
      const { sim, alignment } = await alignCase(carton, o);
      expectAccurate(alignment, sim, carton, o);
      expect(alignment.coveredMm.w).toBeCloseTo(297, 0);
      expect(alignment.coveredMm.h).toBeCloseTo(210, 0);
    });
  }

  it("reports the scan's position of the page corner and the residual in px and mm", async () => {
    const o: GlassOptions = { rotationDeg: 0, dpi: 150, sizeMm: { w: 320, h: 240 }, centreMm: { x: 160.5, y: 117 } };
    const { alignment: a } = await alignCase(carton, o);
    // Page corner = centre − half the page (the raster's size: whole pixels, so 296.93 × 210.06 mm).
    expect(Math.abs(a.txMm - (160.5 - (carton.width * 12.7) / DPI))).toBeLessThan(0.03);
    expect(Math.abs(a.tyMm - (117 - (carton.height * 12.7) / DPI))).toBeLessThan(0.03);
    expect(a.residualMm).toBeCloseTo((a.residualPx * 25.4) / DPI, 3);
  });
});

describe("alignScan when the scan sees only part of the sheet", () => {
  it("locates the left half and reports the covered rectangle", async () => {
    // Glass 170 × 230 mm; the 297 mm sheet's centre 160 mm right of the glass's left edge: the left ~158 mm show.
    const o: GlassOptions = { rotationDeg: 1.1, sizeMm: { w: 170, h: 230 }, centreMm: { x: 160, y: 115 } };
    const { sim, alignment } = await alignCase(carton, o);
    const truth = pxRectToMm(coveredRect(sim.artworkToScan, carton.width, carton.height, sim.scan.width, sim.scan.height)!, DPI);
    for (const k of ["x", "y", "w", "h"] as const) expect(Math.abs(alignment.coveredMm[k] - truth[k])).toBeLessThan(0.2);
    expect(alignment.coveredMm.w).toBeGreaterThan(150);
    expect(alignment.coveredMm.w).toBeLessThan(170);
    expectAccurate(alignment, sim, carton, o, truth);
  });

  it("locates a window onto one corner of a larger sheet, turned a quarter, dark lid beyond the edges", async () => {
    const o: GlassOptions = { rotationDeg: -88.5, sizeMm: { w: 200, h: 250 }, centreMm: { x: 160, y: 225 }, background: GREY_LID };
    const { sim, alignment } = await alignCase(fifteenUp, o);
    const truth = pxRectToMm(coveredRect(sim.artworkToScan, fifteenUp.width, fifteenUp.height, sim.scan.width, sim.scan.height)!, DPI);
    for (const k of ["x", "y", "w", "h"] as const) expect(Math.abs(alignment.coveredMm[k] - truth[k])).toBeLessThan(0.2);
    expectAccurate(alignment, sim, fifteenUp, o, truth);
  });
});

describe("alignScan on a 15-up sheet of identical ups", () => {
  it("places a window that includes the sheet's corner", async () => {
    const o: GlassOptions = { rotationDeg: 0.5, sizeMm: { w: 180, h: 200 }, centreMm: { x: 215, y: 155 } };
    const { sim, alignment } = await alignCase(fifteenUp, o);
    const truth = pxRectToMm(coveredRect(sim.artworkToScan, fifteenUp.width, fifteenUp.height, sim.scan.width, sim.scan.height)!, DPI);
    expectAccurate(alignment, sim, fifteenUp, o, truth);
  });

  it("places a window that holds the sheet's corner even where the coarse level scores placements one up apart alike", async () => {
    // Before the finer level chose between them, this window (corner 1.5 mm from the scan's top) was refused as
    // scan_ambiguous: its coarse scores for the right place and for one up off lay within 0.01.
    const o: GlassOptions = { rotationDeg: 0.5, sizeMm: { w: 180, h: 200 }, centreMm: { x: 215, y: 150 } };
    const { sim, alignment } = await alignCase(fifteenUp, o);
    const truth = pxRectToMm(coveredRect(sim.artworkToScan, fifteenUp.width, fifteenUp.height, sim.scan.width, sim.scan.height)!, DPI);
    expectAccurate(alignment, sim, fifteenUp, o, truth);
  });

  it("refuses a window along the top edge only, where the ups repeat sideways", async () => {
    const { scan } = placeOnGlass(fifteenUp, { rotationDeg: 0.5, sizeMm: { w: 200, h: 220 }, centreMm: { x: 100, y: 170 } });
    await expect(alignScan(fifteenUp, scan)).rejects.toMatchObject({ code: "scan_ambiguous" });
  });

  it("refuses to guess where a window onto identical ups only, with no edge or margin, belongs", async () => {
    const { scan } = placeOnGlass(fifteenUp, { rotationDeg: 0.5, sizeMm: { w: 150, h: 150 }, centreMm: { x: 130, y: 100 } });
    await expect(alignScan(fifteenUp, scan)).rejects.toMatchObject({ code: "scan_ambiguous" });
  });

  it("does not lock one up off, whichever way round the sheet lies", async () => {
    for (const o of [
      { rotationDeg: 0.9, centreMm: { x: 230, y: 160 }, sizeMm: { w: 445, h: 330 } },
      { rotationDeg: 182.5, scale: 1.02, background: GREY_LID },
    ] as GlassOptions[]) {
      const { sim, alignment } = await alignCase(fifteenUp, o);
      expectAccurate(alignment, sim, fifteenUp, o);
    }
  });
});

describe("alignScan on a realistic print and scan", () => {
  it("holds with ink, paper, halftone, scanner tone, blur, noise and JPEG", async () => {
    const printed: ArtworkRaster = { ...carton, data: new Uint8ClampedArray(carton.data) };
    applyPress(printed, { density: 1.08, paperWhite: [248, 246, 240], cast: [1, 0.98, 0.95], crossTalk: 0.03, halftone: { lpi: 40, angleDeg: 45, amplitude: 0.3 } });
    const o: GlassOptions = { rotationDeg: -2.1, scale: 1.01, dpi: 150, background: WHITE_LID };
    const sim = placeOnGlass(printed, o);
    const noisy: ScanImage = { ...sim.scan, data: await applyScanner(sim.scan, { gamma: 0.9, blurMm: 0.12, noise: 4, jpegQuality: 85 }, seeded(7)) };
    const { alignment } = await alignScan(carton, noisy);
    expectAccurate(alignment, { ...sim, scan: noisy }, carton, o);
  });
});

describe("alignScan with local refinement for paper stretch", () => {
  it("follows a smooth stretch that an affine map cannot", async () => {
    const stretch = (x: number, y: number): [number, number] => [0.35 * Math.sin((Math.PI * y) / 210), 0.3 * Math.sin((Math.PI * x) / 297)];
    const o: GlassOptions = { rotationDeg: 0.7, distortMm: stretch };
    const sim = placeOnGlass(carton, o);
    const plain = (await alignScan(carton, sim.scan)).alignment;
    const local = (await alignScan(carton, sim.scan, { localRefinement: true })).alignment;
    expect(local.localField).toBeDefined();
    // Error of each map over a lattice of page points, with the field applied as the warp applies it.
    const err = (a: Alignment) => {
      let worst = 0;
      for (let y = 60; y < carton.height - 60; y += 70) {
        for (let x = 60; x < carton.width - 60; x += 70) {
          const p = fieldPoint(a, x, y), q = sim.scanPoint(x, y);
          worst = Math.max(worst, (Math.hypot(p[0] - q[0], p[1] - q[1]) * 25.4) / sim.scan.dpi);
        }
      }
      return worst;
    };
    expect(err(plain)).toBeGreaterThan(0.15);
    expect(err(local)).toBeLessThan(0.1);
    // The warp applies the field: the warped scan then sits closer on the artwork than through the affine alone.
    const misfit = (a: Alignment) => {
      const { image, mask } = warpScanToArtwork(sim.scan, a, carton);
      let sum = 0, n = 0;
      for (let i = 0; i < mask.length; i++) {
        if (!mask[i]) continue;
        sum += Math.abs(image.data[i * 4 + 1] - carton.data[i * 4 + 1]);
        n++;
      }
      return sum / n;
    };
    expect(misfit(local)).toBeLessThan(0.9 * misfit(plain));
  });
});

/** Scan point of artwork pixel (x, y) with the local field, bilinear between nodes as the warp does. */
function fieldPoint(a: Alignment, x: number, y: number): [number, number] {
  const f = a.localField;
  let dx = 0, dy = 0;
  if (f) {
    const gx = Math.min(Math.max((x - f.originX) / f.step, 0), f.cols - 1), gy = Math.min(Math.max((y - f.originY) / f.step, 0), f.rows - 1);
    const i0 = Math.min(Math.floor(gx), f.cols - 2), j0 = Math.min(Math.floor(gy), f.rows - 2), tx = gx - i0, ty = gy - j0;
    const at = (v: number[], i: number, j: number) => v[j * f.cols + i];
    const bil = (v: number[]) => (1 - ty) * ((1 - tx) * at(v, i0, j0) + tx * at(v, i0 + 1, j0)) + ty * ((1 - tx) * at(v, i0, j0 + 1) + tx * at(v, i0 + 1, j0 + 1));
    dx = bil(f.dx);
    dy = bil(f.dy);
  }
  return apply(a.artworkToScan, x + dx, y + dy);
}

describe("warpScanToArtwork", () => {
  it("brings the scan into the artwork grid, tile by tile, with a mask of what the scan covers", async () => {
    const o: GlassOptions = { rotationDeg: 1.4, sizeMm: { w: 170, h: 230 }, centreMm: { x: 160, y: 115 } };
    const { sim, alignment } = await alignCase(carton, o);
    const whole = warpScanToArtwork(sim.scan, alignment, carton);
    const truth = warpScanToArtwork(sim.scan, { artworkToScan: sim.artworkToScan }, carton);
    expect(whole.image.width).toBe(carton.width);
    // Where covered, the warp through the found map matches the warp through the true one (mean |Δ| of the green
    // channel, 0–255), and both reproduce the artwork up to the blur of resampling twice.
    let found = 0, resampled = 0, n = 0, uncovered = 0;
    for (let i = 0; i < whole.mask.length; i++) {
      if (!whole.mask[i]) {
        uncovered++;
        continue;
      }
      found += Math.abs(whole.image.data[i * 4 + 1] - truth.image.data[i * 4 + 1]);
      resampled += Math.abs(truth.image.data[i * 4 + 1] - carton.data[i * 4 + 1]);
      n++;
    }
    expect(found / n).toBeLessThan(1);
    expect(resampled / n).toBeLessThan(8);
    // The right part of the page (beyond ~158 mm) is not on the scan.
    expect(whole.mask[100 * carton.width + carton.width - 10]).toBe(0);
    expect(uncovered / whole.mask.length).toBeGreaterThan(0.4);
    // A tile equals the same rectangle of the whole.
    const region = { x: 200, y: 150, w: 300, h: 200 };
    const tile = warpScanToArtwork(sim.scan, alignment, carton, region);
    for (let row = 0; row < region.h; row += 37) {
      for (let col = 0; col < region.w; col += 41) {
        const i = row * region.w + col, j = (region.y + row) * carton.width + region.x + col;
        expect(tile.mask[i]).toBe(whole.mask[j]);
        expect(tile.image.data[i * 4]).toBe(whole.image.data[j * 4]);
      }
    }
  });

  it("writes every pixel and mask byte of reused buffers, covered or not, in RGB and RGBA", async () => {
    const o: GlassOptions = { rotationDeg: -2.2, sizeMm: { w: 170, h: 230 }, centreMm: { x: 160, y: 115 } };
    const { sim, alignment } = await alignCase(carton, o);
    for (const channels of [3, 4] as const) {
      const fresh = warpScanToArtwork(sim.scan, alignment, carton, undefined, undefined, channels);
      const reused = new WarpBuffers();
      // Leave the buffers full of another warp's pixels and a mask of 1s first.
      warpScanToArtwork(sim.scan, { artworkToScan: [1, 0, 0, 0, 1, 0] }, carton, undefined, reused, channels).mask.fill(1);
      const again = warpScanToArtwork(sim.scan, alignment, carton, undefined, reused, channels);
      expect(Buffer.compare(Buffer.from(again.image.data), Buffer.from(fresh.image.data))).toBe(0);
      expect(Buffer.compare(Buffer.from(again.mask), Buffer.from(fresh.mask))).toBe(0);
    }
  });
});

describe("alignScan refuses what is not a scan of this artwork", () => {
  it("refuses a scan of a different artwork", async () => {
    const other = await rasterisePage((await makeCartonPdf({ widthMm: 297, heightMm: 210, rows: 1, columns: 2, marginMm: 20 })).pdf, { dpi: DPI });
    const { scan } = placeOnGlass(other, { rotationDeg: 1 });
    await expect(alignScan(carton, scan)).rejects.toMatchObject({ code: "scan_mismatch", message: "the scan does not match this artwork" });
  });

  it("refuses a design of the same brand in another layout, and a sheet of another size", async () => {
    for (const other of [
      { widthMm: 297, heightMm: 210, rows: 2, columns: 2 },
      { widthMm: 210, heightMm: 297, rows: 3, columns: 2 },
    ]) {
      const raster = await rasterisePage((await makeCartonPdf(other)).pdf, { dpi: DPI });
      const { scan } = placeOnGlass(raster, { rotationDeg: 1, background: GREY_LID });
      await expect(alignScan(carton, scan)).rejects.toMatchObject({ code: "scan_mismatch" });
    }
  });

  it("accepts the same artwork with a changed word (a defect, not another artwork)", async () => {
    const changed = await rasterisePage((await makeCartonPdf({ widthMm: 297, heightMm: 210, rows: 2, columns: 3, changedWord: { up: 2 } })).pdf, { dpi: DPI });
    const o: GlassOptions = { rotationDeg: 1 };
    const sim = placeOnGlass(changed, o);
    const { alignment } = await alignScan(carton, sim.scan);
    expectAccurate(alignment, sim, carton, o);
    expect(alignment.patchAgreement).toBeGreaterThan(0.9);
  });

  it("refuses a scan of an unrelated design", async () => {
    const { scan } = placeOnGlass(stripes(carton), { rotationDeg: -0.5 });
    await expect(alignScan(carton, scan)).rejects.toMatchObject({ code: "scan_mismatch" });
  });

  for (const [lid, bg] of [["white", WHITE_LID], ["dark grey", GREY_LID]] as const) {
    it(`refuses a blank sheet on a ${lid} lid`, async () => {
      const blank: ArtworkRaster = { ...carton, data: new Uint8ClampedArray(carton.data.length).fill(250) };
      const sim = placeOnGlass(blank, { rotationDeg: 0.8, background: bg });
      const noisy: ScanImage = { ...sim.scan, data: await applyScanner(sim.scan, { noise: 3 }, seeded(3)) };
      const err = await alignScan(carton, noisy).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(ImagingError);
      expect(err).toMatchObject({ code: "scan_mismatch", message: "the scan does not match this artwork" });
    });
  }

  it("rejects pixel data that does not match the stated size", async () => {
    const bad: ScanImage = { width: 10, height: 10, data: new Uint8Array(12), dpi: 100, dpiSource: "caller" };
    await expect(alignScan(carton, bad)).rejects.toMatchObject({ code: "bad_image" });
  });
});

/** An unrelated design of the same size: bands and blocks. */
function stripes(like: ArtworkRaster): ArtworkRaster {
  const data = new Uint8ClampedArray(like.data.length);
  const rnd = seeded(11);
  const blocks = Array.from({ length: 40 }, () => [rnd() * like.width, rnd() * like.height, 20 + rnd() * 150, 20 + rnd() * 150, rnd() * 200]);
  for (let y = 0; y < like.height; y++) {
    for (let x = 0; x < like.width; x++) {
      let v = 235 + 20 * Math.sin(x / 9) * Math.sin(y / 13);
      for (const [bx, by, bw, bh, g] of blocks) if (x >= bx && x < bx + bw && y >= by && y < by + bh) v = g;
      const p = (y * like.width + x) * 4;
      data[p] = v;
      data[p + 1] = 255 - v / 2;
      data[p + 2] = v;
      data[p + 3] = 255;
    }
  }
  return { ...like, data };
}
