// Labelling and findings on hand-made difference bands (expected values worked out by hand).
import { describe, expect, it } from "vitest";
import { PIXEL_COLOUR_SHIFT, PIXEL_EXTRA_INK, PIXEL_MISSING_INK, type BandDifference } from "@/lib/imaging/compare/compare";
import { RegionCollector, regionsToFindings, upOf } from "@/lib/imaging/findings/findings";

function band(width: number, rows: string[], kind = PIXEL_EXTRA_INK, e = 10): BandDifference {
  const deltaE = new Float32Array(width * rows.length);
  const k = new Uint8Array(width * rows.length);
  rows.forEach((row, y) => [...row].forEach((c, x) => {
    if (c === "#") { deltaE[y * width + x] = e; k[y * width + x] = kind; }
  }));
  return { deltaE, score: deltaE, kind: k, structural: new Uint8Array(width * rows.length), shift: new Int8Array(width * rows.length * 3), flagged: 0, candidates: 0, screenMs: 0 };
}

const rules = { dpi: 254, minStrongPx: 1, minAreaMm2: 0, mergeMm: 0, pageMm: { widthMm: 10, heightMm: 10 } };

describe("region labelling", () => {
  it("joins a shape split across two bands, 8-connected", () => {
    const c = new RegionCollector(6, 5);
    c.addBand(band(6, ["#.....", ".#...."]), 2, 0);
    c.addBand(band(6, ["..#...", "......", "....##"]), 3, 2);
    const regions = c.regions().sort((a, b) => a.x0 - b.x0);
    expect(regions).toHaveLength(2);
    expect(regions[0]).toMatchObject({ x0: 0, y0: 0, x1: 3, y1: 3, count: 3, strongCount: 3 });
    expect(regions[1]).toMatchObject({ x0: 4, y0: 4, x1: 6, y1: 5, count: 2 });
  });

  it("does not join rows that are not consecutive", () => {
    const c = new RegionCollector(3);
    c.addBand(band(3, ["#.."]), 1, 0);
    c.addBand(band(3, ["#.."]), 1, 2);
    expect(c.regions()).toHaveLength(2);
  });
});

describe("regions to findings", () => {
  it("gives boxes in mm, area, mean and max ΔE00 and the kind by weighted vote", () => {
    const c = new RegionCollector(10, 5);
    const b = band(10, ["..##......", "..##......"], PIXEL_MISSING_INK, 8);
    b.deltaE[2] = 12;
    b.score[2] = 12;
    c.addBand(b, 2, 3);
    const { findings } = regionsToFindings(c.regions(), rules);
    // 254 dpi: 0.1 mm a pixel.
    expect(findings).toEqual([
      { xMm: 0.2, yMm: 0.3, wMm: 0.2, hMm: 0.2, areaMm2: 0.04, kind: "missing_ink", deltaE00Mean: 9, deltaE00Max: 12, up: null },
    ]);
  });

  it("merges blobs closer than the merge distance and drops regions without enough strong pixels", () => {
    const c = new RegionCollector(20, 5);
    c.addBand(band(20, ["##..##.........#"]), 1, 0);
    const weak = band(20, ["..........#....."], PIXEL_COLOUR_SHIFT, 3);
    const merged = regionsToFindings([...c.regions(), ...(() => { const w = new RegionCollector(20, 5); w.addBand(weak, 1, 5); return w.regions(); })()], { ...rules, mergeMm: 0.25 });
    expect(merged.findings.map((f) => [f.xMm, f.wMm])).toEqual([[0, 0.6], [1.5, 0.1]]);
  });

  it("drops a colour region whose differences point every way (a beating screen) but keeps a speck of ink inside it", () => {
    // 10 × 20 px of colour-shift pixels whose CIELAB differences alternate ±8 in a* (mean vector 0), with a
    // 2 × 2 px speck of extra ink in it; and a second, coherent patch of 21 × 20 px (+8 in b* everywhere).
    const rows = Array.from({ length: 20 }, () => "##########." + "#".repeat(21));
    const b = band(32, rows, PIXEL_COLOUR_SHIFT, 8);
    for (let y = 0; y < 20; y++) for (let x = 0; x < 32; x++) {
      const i = y * 32 + x;
      if (b.deltaE[i] === 0) continue;
      if (x < 10) b.shift[i * 3 + 1] = (x + y) % 2 === 0 ? 8 : -8;
      else b.shift[i * 3 + 2] = 8;
    }
    for (const [x, y] of [[4, 4], [5, 4], [4, 5], [5, 5]]) { b.kind[y * 32 + x] = PIXEL_EXTRA_INK; b.deltaE[y * 32 + x] = b.score[y * 32 + x] = 20; }
    const ink = new RegionCollector(32, 5, false), colour = new RegionCollector(32, 5, true);
    ink.addBand(b, 20, 0);
    colour.addBand(b, 20, 0);
    const { findings } = regionsToFindings([...ink.regions(), ...colour.regions()], rules);
    expect(findings.map((f) => [f.kind, f.xMm, f.wMm, f.hMm])).toEqual([["colour_shift", 1.1, 2.1, 2], ["extra_ink", 0.4, 0.2, 0.2]]);
  });

  it("calls a long thin region a streak by its second moments (a line of length L has σ = L / √12)", () => {
    const c = new RegionCollector(120, 5);
    // 254 dpi, 0.1 mm a pixel: a 100 × 1 px line (10 mm × 0.1 mm) and a 3 × 3 px spot.
    c.addBand(band(120, ["#".repeat(100) + "...............###", ".".repeat(117) + "###", ".".repeat(117) + "###"]), 3, 0);
    const { findings } = regionsToFindings(c.regions(), { ...rules, pageMm: { widthMm: 12, heightMm: 1 } });
    expect(findings.map((f) => f.kind)).toEqual(["streak", "extra_ink"]);
  });

  it("numbers ups row-major from 1 inside the ups' area, null outside", () => {
    const page = { widthMm: 100, heightMm: 100 };
    const ups = { rows: 2, columns: 3, areaMm: { x: 10, y: 10, w: 90, h: 80 } };
    expect(upOf({ x: 12, y: 12, w: 1, h: 1 }, ups, page)).toBe(1);
    expect(upOf({ x: 95, y: 12, w: 1, h: 1 }, ups, page)).toBe(3);
    expect(upOf({ x: 12, y: 60, w: 1, h: 1 }, ups, page)).toBe(4);
    expect(upOf({ x: 5, y: 60, w: 1, h: 1 }, ups, page)).toBeNull();
    expect(upOf({ x: 12, y: 60, w: 1, h: 1 }, undefined, page)).toBeNull();
  });

  it("reports a colour shift from 4 mm² (a 2 × 2 mm patch), a smaller colour spot only when it peaks at 5 × the profile's ΔE00 (as ink), while a speck of ink may be smaller", () => {
    // 0.1 mm a pixel: 3 × 3 px (0.09 mm²) of colour at ΔE00 10, the same of extra ink, and of colour at ΔE00 20.
    const c = new RegionCollector(40, 5);
    c.addBand(band(40, ["###.....................................", "###", "###"].map((r) => r.padEnd(40, ".")), PIXEL_COLOUR_SHIFT), 3, 0);
    c.addBand(band(40, ["###", "###", "###"].map((r) => r.padEnd(40, ".")), PIXEL_EXTRA_INK), 3, 10);
    // The strong spot is darker than the artwork (L* −10): reported as a spot of ink, not as a colour shift,
    // which needs an area (a dot of pen ink).
    const spot = band(40, ["###", "###", "###"].map((r) => r.padEnd(40, ".")), PIXEL_COLOUR_SHIFT, 20);
    for (let i = 0; i < spot.deltaE.length; i++) if (spot.deltaE[i] > 0) spot.shift[i * 3] = -10;
    c.addBand(spot, 3, 20);
    const { findings } = regionsToFindings(c.regions(), { ...rules, minAreaMm2: 0.05, peakDeltaE00: 4 });
    expect(findings.map((f) => [f.kind, f.yMm])).toEqual([["extra_ink", 1], ["extra_ink", 2]]);
  });

  it("reports a colour shift by its mean against the profile's ΔE00, an ink speck by its peak", () => {
    // Under a profile of ΔE00 4, three 20 × 21 px (2 × 2.1 mm) coherent colour regions, each with pixels over the
    // second level (5): columns of 2 and 5 (mean 3.5: within tolerance, dropped), of 3 and 5 (mean 4: kept) and 6.
    const row = "#".repeat(20) + ".".repeat(10) + "#".repeat(20) + ".".repeat(10) + "#".repeat(20);
    const b = band(80, Array.from({ length: 21 }, () => row), PIXEL_COLOUR_SHIFT);
    for (let y = 0; y < 21; y++) for (let x = 0; x < 80; x++) {
      const i = y * 80 + x;
      if (b.deltaE[i] === 0) continue;
      b.deltaE[i] = b.score[i] = x % 2 === 0 && x < 50 ? 5 : x < 20 ? 2 : x < 50 ? 3 : 6;
      b.shift[i * 3 + 1] = 6;
    }
    const c = new RegionCollector(80, 5, true);
    c.addBand(b, 21, 0);
    const { findings } = regionsToFindings(c.regions(), { ...rules, pageMm: { widthMm: 8, heightMm: 2.1 }, peakDeltaE00: 4 });
    expect(findings.map((f) => [f.kind, f.xMm, f.deltaE00Mean]).sort((a, b) => Number(a[1]) - Number(b[1]))).toEqual([
      ["colour_shift", 3, 4],
      ["colour_shift", 6, 6],
    ]);
  });

  it("joins regions whose own boxes come within the merge distance, not regions near the joined box's empty corner", () => {
    // 0.1 mm a pixel, merge distance 1 mm (10 px). Spots A (x 13–15, y 0–2) and B (x 24–26, y 11–13) are within
    // 10 px of each other: one finding. C (x 0–2, y 14–16) is 11 px below A and 21 px left of B, but within 10 px
    // of the box around A and B: joining it through that box is how noise chained over a whole label.
    const rows = Array.from({ length: 17 }, (_, y) => {
      const row = [..." ".repeat(27)].map(() => ".");
      const put = (x0: number) => { for (let x = x0; x < x0 + 3; x++) row[x] = "#"; };
      if (y <= 2) put(13);
      if (y >= 11 && y <= 13) put(24);
      if (y >= 14) put(0);
      return row.join("");
    });
    const c = new RegionCollector(27, 5);
    c.addBand(band(27, rows), 17, 0);
    const { findings } = regionsToFindings(c.regions(), { ...rules, mergeMm: 1, pageMm: { widthMm: 2.7, heightMm: 1.7 } });
    expect(findings.map((f) => [f.xMm, f.yMm, f.wMm, f.hMm])).toEqual([[1.3, 0, 1.4, 1.4], [0, 1.4, 0.3, 0.3]]);
  });

  it("keeps a speck of ink beside a large colour shift as its own tight finding, but joins an ink and a colour region of like size", () => {
    // 0.1 mm a pixel, merge distance 0.5 mm (5 px). A coherent colour patch of 30 × 20 px (600 px, +8 b*) and,
    // 3 px to its right, a 2 × 2 px speck of extra ink (4 px, 150 × smaller): two findings, the speck's box its
    // own 0.2 × 0.2 mm. Below, a 6 × 6 px colour patch and a 4 × 4 px ink spot 3 px apart (36 and 16 px, within
    // 10 ×): one finding over both.
    const w = 40, rows = Array.from({ length: 40 }, (_, y) => {
      const row = [...".".repeat(w)];
      if (y < 20) for (let x = 0; x < 30; x++) row[x] = "c";
      if (y >= 4 && y < 6) for (let x = 33; x < 35; x++) row[x] = "i";
      if (y >= 30 && y < 36) for (let x = 0; x < 6; x++) row[x] = "c";
      if (y >= 30 && y < 34) for (let x = 9; x < 13; x++) row[x] = "i";
      return row.join("");
    });
    const b = band(w, rows.map((r) => r.replace(/[ci]/g, "#")), PIXEL_COLOUR_SHIFT, 8);
    rows.forEach((r, y) => [...r].forEach((ch, x) => {
      const i = y * w + x;
      if (ch === "c") b.shift[i * 3 + 2] = 8;
      if (ch === "i") { b.kind[i] = PIXEL_EXTRA_INK; b.deltaE[i] = b.score[i] = 20; }
    }));
    const ink = new RegionCollector(w, 5, false), colour = new RegionCollector(w, 5, true);
    ink.addBand(b, 40, 0);
    colour.addBand(b, 40, 0);
    const { findings } = regionsToFindings([...ink.regions(), ...colour.regions()], { ...rules, mergeMm: 0.5, pageMm: { widthMm: 4, heightMm: 4 } });
    expect(findings.map((f) => [f.kind, f.xMm, f.yMm, f.wMm, f.hMm])).toEqual([
      ["colour_shift", 0, 0, 3, 2],
      ["extra_ink", 0, 3, 1.3, 0.6], // by the ΔE-weighted vote: ink 16 px × 20 over colour 36 px × 8
      ["extra_ink", 3.3, 0.4, 0.2, 0.2],
    ]);
  });

  it("calls a lighter or darker patch of a few ΔE00 over 4 mm² a colour shift, and a patch of the whole ink missing ink", () => {
    // 0.1 mm a pixel: 30 × 20 px = 6 mm² of missing-ink pixels, once at ΔE00 8 (a tint printed light) and once
    // at ΔE00 30 (ink gone down to the board).
    const rows = Array.from({ length: 20 }, () => "#".repeat(30));
    const kinds = [8, 30].map((e) => {
      const c = new RegionCollector(30, 4);
      c.addBand(band(30, rows, PIXEL_MISSING_INK, e), 20, 0);
      return regionsToFindings(c.regions(), { ...rules, peakDeltaE00: 4, pageMm: { widthMm: 3, heightMm: 2 } }).findings.map((f) => f.kind);
    });
    expect(kinds).toEqual([["colour_shift"], ["missing_ink"]]);
  });
});
