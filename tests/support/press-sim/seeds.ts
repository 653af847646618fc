// Seed ranges. TRAINING seeds may be looked at and tuned on. HELD-OUT seeds are for reporting only: nobody tunes
// the engine, its profiles or this simulator on them, so their figures say how the engine does on sheets it has
// not been fitted to.
export const TRAINING = { from: 1, to: 999 } as const;
export const HELD_OUT = { from: 5000, to: 5999 } as const;

export type SeedSet = "training" | "heldout";

export function seedSet(seed: number): SeedSet | null {
  if (seed >= TRAINING.from && seed <= TRAINING.to) return "training";
  if (seed >= HELD_OUT.from && seed <= HELD_OUT.to) return "heldout";
  return null;
}

/** "A-B" or "A" → the seeds, each inside one of the two ranges. */
export function parseSeeds(text: string): number[] {
  const m = /^(\d+)(?:-(\d+))?$/.exec(text.trim());
  if (!m) throw new Error(`--seeds must look like 1-30 or 5000. Got "${text}".`);
  const from = +m[1], to = m[2] === undefined ? from : +m[2];
  if (to < from) throw new Error(`--seeds ${text}: the range is empty.`);
  const seeds = Array.from({ length: to - from + 1 }, (_, i) => from + i);
  const outside = seeds.find((s) => seedSet(s) === null);
  if (outside !== undefined) throw new Error(`Seed ${outside} is in neither range (training 1–999, held-out 5000–5999).`);
  return seeds;
}
