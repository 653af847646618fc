// The artwork side prepared once per artwork: its local contrast against a direct computation on the same data,
// and the cache handing back the same preparation for every sheet of a run.
import { describe, expect, it } from "vitest";
import { rgbaToLab } from "@/lib/imaging/colour/colour";
import { BLEED_PX, preparedRect, prepareLowPassed } from "@/lib/imaging/compare/prepared";

const W = 57, H = 41;

function noise(): Uint8Array {
  const low = new Uint8Array(W * H * 4);
  for (let i = 0; i < W * H; i++) low.set([(i * 7919) % 256, (i * 104729) % 256, (i * 31) % 256, 255], i * 4);
  return low;
}

describe("prepared artwork", () => {
  it.each([1, 3, 4, 7])("gives the ΔE*ab extent over a square of radius %i, clipped at the borders, as a direct scan does (and about BLEED_PX more for the bleed)", (k) => {
    const low = noise();
    const p = prepareLowPassed(low, { x: 0, y: 0, w: W, h: H }, { opticalBlurPx: 0, sigmaPx: 1, radiusPx: 1, reachPx: k });
    const lab = rgbaToLab(low);
    const direct = (x: number, y: number, r: number) => {
      const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
      for (let yy = Math.max(0, y - r); yy <= Math.min(H - 1, y + r); yy++) {
        for (let xx = Math.max(0, x - r); xx <= Math.min(W - 1, x + r); xx++) {
          for (let c = 0; c < 3; c++) {
            lo[c] = Math.min(lo[c], lab[(yy * W + xx) * 3 + c]);
            hi[c] = Math.max(hi[c], lab[(yy * W + xx) * 3 + c]);
          }
        }
      }
      return Math.min(255, Math.floor(Math.hypot(hi[0] - lo[0], hi[1] - lo[1], hi[2] - lo[2])));
    };
    let mismatches = 0;
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        if (direct(x, y, k) !== p.contrast[y * W + x]) mismatches++;
        // The bleed's wider window is taken on 2-pixel blocks: at least k + BLEED_PX, at most 2 pixels more.
        const wide = p.wideContrast[y * W + x];
        if (wide < direct(x, y, k + BLEED_PX) || wide > direct(x, y, k + BLEED_PX + 2)) mismatches++;
      }
    }
    expect(mismatches).toBe(0);
  });

  it("prepares a page once and hands out rows of it for every band", async () => {
    const art = { width: W, height: H, data: noise() };
    const windows = { opticalBlurPx: 0, sigmaPx: 1.2, radiusPx: 1, reachPx: 4 };
    const whole = await preparedRect(art, { x: 0, y: 0, w: W, h: H }, windows);
    const band = await preparedRect(art, { x: 0, y: 10, w: W, h: 5 }, windows);
    expect(band.low.buffer).toBe(whole.low.buffer);
    expect([...band.contrast]).toEqual([...whole.contrast.subarray(10 * W, 15 * W)]);
    const corner = await preparedRect(art, { x: 5, y: 6, w: 7, h: 3 }, windows);
    expect([...corner.low.subarray(0, 4)]).toEqual([...whole.low.subarray((6 * W + 5) * 4, (6 * W + 5) * 4 + 4)]);
    expect(corner.contrast[0]).toBe(whole.contrast[6 * W + 5]);
  });
});
