// 2-D affine maps as [a, b, c, d, e, f]: x' = a·x + b·y + c, y' = d·x + e·y + f (the layout of
// Alignment.artworkToScan and of OpenCV's 2 × 3 matrices). Pixel centres sit at integer coordinates.

import type { Affine } from "../types";

export type { Affine };

/** p ↦ m(n(p)). */
export function compose(m: Affine, n: Affine): Affine {
  return [
    m[0] * n[0] + m[1] * n[3],
    m[0] * n[1] + m[1] * n[4],
    m[0] * n[2] + m[1] * n[5] + m[2],
    m[3] * n[0] + m[4] * n[3],
    m[3] * n[1] + m[4] * n[4],
    m[3] * n[2] + m[4] * n[5] + m[5],
  ];
}

export function invert(m: Affine): Affine {
  const det = m[0] * m[4] - m[1] * m[3];
  if (!Number.isFinite(det) || Math.abs(det) < 1e-12) throw new RangeError("affine map is singular");
  const a = m[4] / det, b = -m[1] / det, d = -m[3] / det, e = m[0] / det;
  return [a, b, -(a * m[2] + b * m[5]), d, e, -(d * m[2] + e * m[5])];
}

export function apply(m: Affine, x: number, y: number): [number, number] {
  return [m[0] * x + m[1] * y + m[2], m[3] * x + m[4] * y + m[5]];
}

export function scaling(sx: number, sy = sx): Affine {
  return [sx, 0, 0, 0, sy, 0];
}

/** Rotation by `deg` (clockwise on screen, since y points down) and uniform scale, about the origin. */
export function rotation(deg: number, scale = 1): Affine {
  const r = (deg * Math.PI) / 180;
  const c = Math.cos(r) * scale, s = Math.sin(r) * scale;
  return [c, -s, 0, s, c, 0];
}

export function translate(m: Affine, dx: number, dy: number): Affine {
  return [m[0], m[1], m[2] + dx, m[3], m[4], m[5] + dy];
}

/**
 * Least-squares affine from point pairs (p → q), optionally weighted. Solves the two 3 × 3 normal systems
 * (one per output coordinate); coordinates are centred first for conditioning.
 */
export function fitAffine(p: [number, number][], q: [number, number][], w?: number[]): Affine {
  const n = p.length;
  if (n < 3) throw new RangeError("an affine fit needs three points");
  let sw = 0, mx = 0, my = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    sw += wi;
    mx += wi * p[i][0];
    my += wi * p[i][1];
  }
  mx /= sw;
  my /= sw;
  const A = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  const bx = [0, 0, 0], by = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    const v = [p[i][0] - mx, p[i][1] - my, 1];
    for (let r = 0; r < 3; r++) {
      for (let c = 0; c < 3; c++) A[r * 3 + c] += wi * v[r] * v[c];
      bx[r] += wi * v[r] * q[i][0];
      by[r] += wi * v[r] * q[i][1];
    }
  }
  const sx = solve3(A, bx), sy = solve3(A, by);
  // Undo the centring: x' = sx0·(x − mx) + sx1·(y − my) + sx2.
  return [sx[0], sx[1], sx[2] - sx[0] * mx - sx[1] * my, sy[0], sy[1], sy[2] - sy[0] * mx - sy[1] * my];
}

function solve3(A: number[], b: number[]): number[] {
  const m = [
    [A[0], A[1], A[2], b[0]],
    [A[3], A[4], A[5], b[1]],
    [A[6], A[7], A[8], b[2]],
  ];
  for (let c = 0; c < 3; c++) {
    let piv = c;
    for (let r = c + 1; r < 3; r++) if (Math.abs(m[r][c]) > Math.abs(m[piv][c])) piv = r;
    [m[c], m[piv]] = [m[piv], m[c]];
    if (Math.abs(m[c][c]) < 1e-12) throw new RangeError("points are collinear");
    for (let r = 0; r < 3; r++) {
      if (r === c) continue;
      const f = m[r][c] / m[c][c];
      for (let k = c; k < 4; k++) m[r][k] -= f * m[c][k];
    }
  }
  return [m[0][3] / m[0][0], m[1][3] / m[1][1], m[2][3] / m[2][2]];
}

/**
 * Bounding rectangle of the part of the page [0, w] × [0, h] (artwork px) that the scan [0, sw] × [0, sh]
 * (scan px) covers, through the inverse of `artworkToScan`; null when they do not overlap. The scan's outline
 * seen on the page is a convex quadrilateral, clipped to the page (Sutherland–Hodgman).
 */
export function coveredRect(artworkToScan: Affine, w: number, h: number, sw: number, sh: number) {
  const inv = invert(artworkToScan);
  // Pixel centres run 0 … n−1; a pixel's area reaches half a pixel beyond.
  let poly: [number, number][] = [
    [-0.5, -0.5],
    [sw - 0.5, -0.5],
    [sw - 0.5, sh - 0.5],
    [-0.5, sh - 0.5],
  ].map(([x, y]) => apply(inv, x, y));
  const edges: [(p: [number, number]) => number][] = [[(p) => p[0] + 0.5], [(p) => w - 0.5 - p[0]], [(p) => p[1] + 0.5], [(p) => h - 0.5 - p[1]]];
  for (const [inside] of edges) {
    const out: [number, number][] = [];
    for (let i = 0; i < poly.length; i++) {
      const a = poly[i], b = poly[(i + 1) % poly.length];
      const da = inside(a), db = inside(b);
      if (da >= 0) out.push(a);
      if (da >= 0 !== db >= 0) {
        const t = da / (da - db);
        out.push([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
      }
    }
    poly = out;
    if (poly.length === 0) return null;
  }
  const xs = poly.map((p) => p[0]), ys = poly.map((p) => p[1]);
  const x0 = Math.min(...xs), y0 = Math.min(...ys);
  return { x: x0 + 0.5, y: y0 + 0.5, w: Math.max(...xs) - x0, h: Math.max(...ys) - y0 };
}
