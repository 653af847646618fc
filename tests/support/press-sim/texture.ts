// Board and ink texture as smooth value noise on a hashed lattice (no stored grid, any sheet size): fibre about
// 0.1 mm (stretched along the grain), mottle about 1.5 mm. Values are roughly N(0, 1) scaled by amplitude.
export interface NoiseField {
  /** Lattice spacing across and along the grain, mm. */
  cellX: number;
  cellY: number;
  amplitude: number;
  seed: number;
}

function hash(ix: number, iy: number, seed: number): number {
  let h = Math.imul(ix, 374761393) ^ Math.imul(iy, 668265263) ^ Math.imul(seed, 2246822519);
  h = Math.imul(h ^ (h >>> 13), 1274126177);
  h ^= h >>> 16;
  // Uniform in [−1, 1): standard deviation 1/√3; × √3 below makes it 1 at lattice points.
  return (h >>> 0) / 2147483648 - 1;
}

export function noiseAt(f: NoiseField, x: number, y: number): number {
  const gx = x / f.cellX, gy = y / f.cellY;
  const ix = Math.floor(gx), iy = Math.floor(gy);
  let tx = gx - ix, ty = gy - iy;
  tx = tx * tx * (3 - 2 * tx);
  ty = ty * ty * (3 - 2 * ty);
  const a = hash(ix, iy, f.seed), b = hash(ix + 1, iy, f.seed), c = hash(ix, iy + 1, f.seed), d = hash(ix + 1, iy + 1, f.seed);
  // Interpolation shrinks the spread to about 0.6 of the lattice's; 1.732 × 1.6 brings it back near 1.
  return f.amplitude * 2.8 * (a + (b - a) * tx + (c - a) * ty + (a - b - c + d) * tx * ty);
}
