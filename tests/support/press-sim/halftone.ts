// AM clustered-dot screens: a round dot on a square cell, turned to the screen angle. The threshold over a cell
// is the rank of a spot function, so its values are spread evenly over 0–1 and a flat tint of tone a covers
// a of the area (the premise of Murray–Davies).
export interface Screen {
  lpi: number;
  angleDeg: number;
}

/** Common practice, no published source: C 15°, M 75°, Y 0°, K 45° (from memory). */
export const PROCESS_ANGLES = { c: 15, m: 75, y: 0, k: 45 } as const;

export const CELL = 64;

/** Threshold (0–255, as 0–65535/257 scale kept in Uint16 for finer steps) over one cell, CELL × CELL. */
export const THRESHOLD: Uint16Array = (() => {
  const n = CELL * CELL;
  const spot = new Float64Array(n);
  for (let j = 0; j < CELL; j++) {
    for (let i = 0; i < CELL; i++) {
      const u = (i + 0.5) / CELL, v = (j + 0.5) / CELL;
      // Highest at the cell centre: the dot grows from there (tiny jitter breaks ties the same way every time).
      spot[j * CELL + i] = Math.cos(2 * Math.PI * (u - 0.5)) + Math.cos(2 * Math.PI * (v - 0.5)) + 1e-9 * ((i * 31 + j * 17) % 97);
    }
  }
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => spot[b] - spot[a]);
  const t = new Uint16Array(n);
  order.forEach((cellIndex, rank) => (t[cellIndex] = Math.round(((rank + 0.5) / n) * 65535)));
  return t;
})();

/** Screen geometry in sheet mm: cell coordinates u, v of a point are (cos·x + sin·y)·f, (−sin·x + cos·y)·f. */
export function screenBasis(s: Screen): { a: number; b: number } {
  const f = s.lpi / 25.4, r = (s.angleDeg * Math.PI) / 180;
  return { a: Math.cos(r) * f, b: Math.sin(r) * f };
}

/** Is there ink at (x, y) mm for a dot area of `area` (0–65535)? */
export function inked(basis: { a: number; b: number }, x: number, y: number, area: number): boolean {
  const u = basis.a * x + basis.b * y, v = -basis.b * x + basis.a * y;
  const i = ((u - Math.floor(u)) * CELL) | 0, j = ((v - Math.floor(v)) * CELL) | 0;
  return area > THRESHOLD[j * CELL + i];
}
