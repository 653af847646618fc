// The peers the engine is measured against, on the same aligned pair: pixelmatch 7 (in process, counting only)
// and odiff 4.5 (its CLI on PNG files, decoding included; exits 22 when pixels differ).
import { spawnSync } from "node:child_process";
import { createRequire } from "node:module";
import path from "node:path";
import pixelmatch from "pixelmatch";
import type { RgbaImage } from "../lib/imaging/types";

export function median(values: number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** Median time (ms) of pixelmatch with its default threshold 0.1, and the differing pixel count. */
export function timePixelmatch(a: RgbaImage, b: RgbaImage, runs: number): { ms: number; differing: number } {
  const times: number[] = [];
  let differing = 0;
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    differing = pixelmatch(a.data, b.data, undefined, a.width, a.height, { threshold: 0.1 });
    times.push(performance.now() - t);
  }
  return { ms: median(times), differing };
}

const odiffBinary = path.join(path.dirname(createRequire(import.meta.url).resolve("odiff-bin/package.json")), "bin/odiff");

/** Median wall time (ms) of the odiff CLI on two PNG files, and its exit code (22: pixels differ). */
export function timeOdiff(pngA: string, pngB: string, diffOut: string, runs: number): { ms: number; exitCode: number | null } {
  const times: number[] = [];
  let exitCode: number | null = null;
  for (let i = 0; i < runs; i++) {
    const t = performance.now();
    const run = spawnSync(odiffBinary, [pngA, pngB, diffOut, "--threshold", "0.1"], { encoding: "utf8" });
    times.push(performance.now() - t);
    exitCode = run.status;
    if (run.status !== 0 && run.status !== 22) throw new Error(`odiff failed (${run.status}): ${run.stderr || run.stdout}`);
  }
  return { ms: median(times), exitCode };
}
