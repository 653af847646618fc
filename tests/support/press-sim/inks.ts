// The press's inks: Neugebauer primaries (paper and every overprint of C, M, Y, K) in linear RGB reflectance,
// built as products of each ink's solid (a simple subtractive model), and mechanical dot gain as a tone curve.
export interface InkSet {
  /** 16 primaries × 3 (linear R, G, B), index = c | m << 1 | y << 2 | k << 3. */
  primaries: Float32Array;
  /** Tone (0–255) → printed dot area (0–255) after dot gain. */
  gain: Uint8Array;
}

// Solids on white, linear RGB reflectance (roughly a process set on coated board).
const SOLIDS = [
  [0.03, 0.3, 0.72],
  [0.78, 0.04, 0.26],
  [0.95, 0.83, 0.04],
  [0.028, 0.028, 0.03],
] as const;

/** dotGain50: the dot area added at 50 % tone (e.g. 0.14 = 14 points). */
export function inkSet(dotGain50: number, trapping = 0.97): InkSet {
  const primaries = new Float32Array(48);
  for (let idx = 0; idx < 16; idx++) {
    let n = 0;
    for (let ch = 0; ch < 3; ch++) {
      let r = 1;
      for (let ink = 0; ink < 4; ink++) if (idx & (1 << ink)) r *= SOLIDS[ink][ch];
      primaries[idx * 3 + ch] = r;
    }
    for (let ink = 0; ink < 4; ink++) if (idx & (1 << ink)) n++;
    // Overprints trap a little less ink than the product says: slightly lighter.
    if (n > 1) for (let ch = 0; ch < 3; ch++) primaries[idx * 3 + ch] = Math.pow(primaries[idx * 3 + ch], trapping);
  }
  return { primaries, gain: dotGainCurve(dotGain50) };
}

/** a' = a + 4 g a (1 − a): g at 50 %, none at 0 and 100 %. */
export function dotGainCurve(g: number): Uint8Array {
  const lut = new Uint8Array(256);
  for (let v = 0; v < 256; v++) {
    const a = v / 255;
    lut[v] = Math.round(255 * Math.min(1, a + 4 * g * a * (1 - a)));
  }
  return lut;
}

/** Mean reflectance of a patch with dot areas c, m, y, k (0–1), by the Demichel weights of the 16 primaries. */
export function meanReflectance(inks: InkSet, areas: readonly number[]): [number, number, number] {
  const out: [number, number, number] = [0, 0, 0];
  for (let idx = 0; idx < 16; idx++) {
    let w = 1;
    for (let ink = 0; ink < 4; ink++) w *= idx & (1 << ink) ? areas[ink] : 1 - areas[ink];
    for (let ch = 0; ch < 3; ch++) out[ch] += w * inks.primaries[idx * 3 + ch];
  }
  return out;
}
