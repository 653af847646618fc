// LOCAL FIELD for paper stretch (optional): what is left after the affine map, on a grid.
//
// Offsets are measured at the most structured site of each FIELD_CELL_MM cell (once: the parabolic peak's bias,
// a few hundredths of a pixel, is below what matters here); a site far from its neighbouring cells' median is a defect
// or variable data under the patch, not stretch, and is dropped. Nodes of a regular grid then take a
// Gaussian-weighted local linear fit of the sites around them: paper stretch is smooth, and the first-order
// fit carries the trend out to the edge of the measured area instead of pulling edge nodes towards the middle.
// Neighbours are looked up by cell, so the cost grows with the number of cells, not its square.
import { apply, fitAffine, type Affine } from "./affine";
import { chooseSites, measure, MAX_RADIUS, type FineArtwork, type Image, type Measure, type Rect } from "./patches";
import type { OpenCv } from "./opencv";
import type { DisplacementField } from "../types";

const FIELD_CELL_MM = 25;
/** A local offset this far from its neighbours' median is not paper stretch. */
const OUTLIER_MM = 0.15;
/** Structure is sampled more sparsely here than for the affine sites: there are many more cells. */
const STRIDE = 8;

export function localField(cv: OpenCv, art: FineArtwork, scan: Image, map: Affine, toFull: Affine, r: Rect, dpi: number): DisplacementField | undefined {
  const cell = (FIELD_CELL_MM * dpi) / 25.4;
  const cols = Math.max(2, Math.round((r.x1 - r.x0) / cell)), rows = Math.max(2, Math.round((r.y1 - r.y0) / cell));
  const sites = chooseSites(art, r, cols, rows, STRIDE);
  const radius = Math.min(MAX_RADIUS, Math.max(2, Math.ceil(dpi / 25.4)));
  const found = measure(cv, art, scan, map, toFull, sites.at, radius);
  // Cell of each measurement, for neighbour look-ups.
  const byCell: Measure[][] = Array.from({ length: cols * rows }, () => []);
  for (const m of found) byCell[sites.cell[m.site]].push(m);
  const near = (ci: number, cj: number, reach: number) => {
    const out: Measure[] = [];
    for (let j = Math.max(0, cj - reach); j <= Math.min(rows - 1, cj + reach); j++) {
      for (let i = Math.max(0, ci - reach); i <= Math.min(cols - 1, ci + reach); i++) out.push(...byCell[j * cols + i]);
    }
    return out;
  };
  const limit = ((OUTLIER_MM * dpi) / 25.4) * toFull[0];
  for (let c = 0; c < byCell.length; c++) {
    byCell[c] = byCell[c].filter((m) => {
      const around = near(c % cols, Math.floor(c / cols), 1).filter((o) => o !== m);
      if (around.length < 3) return true;
      const med = (k: 0 | 1) => around.map((o) => o.off[k]).sort((a, b) => a - b)[Math.floor(around.length / 2)];
      return Math.hypot(m.off[0] - med(0), m.off[1] - med(1)) <= limit;
    });
  }
  if (byCell.reduce((n, c) => n + c.length, 0) < 4) return undefined;

  // Nodes at the cell corners, in full artwork px.
  const cw = ((r.x1 - r.x0) / cols) * toFull[0], ch = ((r.y1 - r.y0) / rows) * toFull[4];
  const step = Math.min(cw, ch);
  const [ox, oy] = apply(toFull, r.x0, r.y0);
  const nc = Math.floor((cols * cw) / step) + 1, nr = Math.floor((rows * ch) / step) + 1;
  const sigma2 = 2 * (0.6 * step) ** 2;
  const dx: number[] = [], dy: number[] = [];
  for (let j = 0; j < nr; j++) {
    for (let i = 0; i < nc; i++) {
      const x = ox + i * step, y = oy + j * step;
      const ci = Math.min(cols - 1, Math.floor((x - ox) / cw)), cj = Math.min(rows - 1, Math.floor((y - oy) / ch));
      const [vx, vy] = localValue(near(ci, cj, 2), x, y, sigma2);
      dx.push(round3(vx));
      dy.push(round3(vy));
    }
  }
  return { originX: ox, originY: oy, step, cols: nc, rows: nr, dx, dy };
}

/** Offset at (x, y): Gaussian-weighted local linear fit over the measurements (weighted mean if degenerate). */
function localValue(found: Measure[], x: number, y: number, sigma2: number): [number, number] {
  const w = found.map((m) => Math.exp(-((m.at[0] - x) ** 2 + (m.at[1] - y) ** 2) / sigma2));
  const sw = w.reduce((a, b) => a + b, 0);
  if (sw < 1e-6) return [0, 0];
  if (found.length >= 4) {
    try {
      const fit = fitAffine(
        found.map((m) => [m.at[0] - x, m.at[1] - y]),
        found.map((m) => m.off),
        w,
      );
      if (Number.isFinite(fit[2]) && Number.isFinite(fit[5])) return [fit[2], fit[5]];
    } catch {
      // Collinear measurements nearby: fall back to the weighted mean.
    }
  }
  return [found.reduce((a, m, i) => a + w[i] * m.off[0], 0) / sw, found.reduce((a, m, i) => a + w[i] * m.off[1], 0) / sw];
}

const round3 = (v: number) => Math.round(v * 1000) / 1000;
