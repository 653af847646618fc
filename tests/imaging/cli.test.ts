import { spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { rasterisePage } from "@/lib/imaging/rasterise/rasterise";
import { makeCartonPdf } from "../support/carton";
import { simulateSheet } from "../support/simulator/index";

const ROOT = path.resolve(import.meta.dirname, "../..");
const TSX = path.join(ROOT, "node_modules/.bin/tsx");
const CLI = path.join(ROOT, "lib/imaging/cli.ts");
const DPI = 150;
const DOT = { xMm: 60, yMm: 110, diameterMm: 1.5 };
let dir: string;

function inspect(...args: string[]) {
  const env = { ...process.env, NEXT_TELEMETRY_DISABLED: "1", XDG_CACHE_HOME: path.join(dir, "cache") };
  const run = spawnSync(TSX, [CLI, ...args], { cwd: ROOT, encoding: "utf8", env });
  return { code: run.status, stdout: run.stdout, stderr: run.stderr };
}
const file = (name: string) => path.join(dir, name);

beforeAll(async () => {
  dir = mkdtempSync(path.join(tmpdir(), "tympan-cli-"));
  const { pdf } = await makeCartonPdf({ widthMm: 200, heightMm: 140, rows: 1, columns: 2 });
  writeFileSync(file("artwork.pdf"), pdf);
  // A scan already in the artwork's grid: the artwork itself, and the same with a dark 1.5 mm dot in up 1.
  const r = await rasterisePage(pdf, { dpi: DPI });
  const raw = { raw: { width: r.width, height: r.height, channels: 4 as const } };
  await sharp(Buffer.from(r.data), raw).png().withDensity(DPI).toFile(file("clean.png"));
  const marked = Buffer.from(r.data);
  const k = DPI / 25.4;
  for (let y = 0; y < r.height; y++) {
    for (let x = 0; x < r.width; x++) {
      if (Math.hypot((x + 0.5) / k - DOT.xMm, (y + 0.5) / k - DOT.yMm) < DOT.diameterMm / 2) marked.set([40, 45, 95], (y * r.width + x) * 4);
    }
  }
  await sharp(marked, raw).png().withDensity(DPI).toFile(file("dot.png"));
  // The same sheet laid on the scanner glass, turned 0.4° and shifted into a 5 mm margin.
  const glass = await simulateSheet(r, { geometry: { rotationDeg: 0.4, marginMm: 5 } });
  const g = glass.scan;
  await sharp(Buffer.from(g.data), { raw: { width: g.width, height: g.height, channels: 4 } }).png().withDensity(DPI).toFile(file("turned.png"));
  // The same without a resolution tag (no pHYs chunk: PNG specification, ISO/IEC 15948, 11.3.5.3).
  await sharp(Buffer.from(g.data), { raw: { width: g.width, height: g.height, channels: 4 } }).png().toFile(file("untagged.png"));
  writeFileSync(file("notes.pdf"), "these are notes, not a PDF");
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("the scan's resolution", () => {
  it("is taken from the file's tag, and compared at", () => {
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json", "--no-cache");
    expect(run.stderr).toBe("");
    expect(JSON.parse(run.stdout).resolution).toEqual({ scan_dpi: DPI, scan_dpi_source: "file", compared_at_dpi: DPI });
  });

  it("is measured when the file does not say, and the sheet inspects as the tagged one does", async () => {
    expect((await sharp(file("untagged.png")).metadata()).density).toBeUndefined();
    const tagged = JSON.parse(inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json", "--no-cache").stdout);
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("untagged.png"), "--json", "--no-cache");
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout);
    expect(out.resolution.scan_dpi_source).toBe("measured");
    expect(out.resolution.compared_at_dpi).toBe(DPI);
    expect(Math.abs(out.resolution.scan_dpi - DPI)).toBeLessThan(DPI * 0.002);
    expect(out.findings.length).toBe(tagged.findings.length);
    expect(out.alignment.rotation_deg).toBeCloseTo(tagged.alignment.rotation_deg, 2);
  });

  it("--dpi overrides the file", () => {
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json", "--no-cache", "--dpi", "150");
    expect(JSON.parse(run.stdout).resolution.scan_dpi_source).toBe("caller");
  });

  it("keeps the artwork's prepared side for the next run, which reads it and finds the same", () => {
    const cache = path.join(dir, "prepared-cache");
    const first = inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json", "--cache", cache);
    expect(first.stderr).toBe("");
    expect(readdirSync(cache).filter((f) => f.endsWith(".bin"))).toHaveLength(1);
    const second = inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json", "--cache", cache);
    expect(JSON.parse(second.stdout).findings).toEqual(JSON.parse(first.stdout).findings);
    // A damaged file is prepared again and replaced, with a word on stderr.
    const [bin] = readdirSync(cache);
    writeFileSync(path.join(cache, bin), "damaged");
    const third = inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json", "--cache", cache);
    expect(third.stderr).toMatch(/not used/);
    expect(JSON.parse(third.stdout).findings).toEqual(JSON.parse(first.stdout).findings);
  });
});

// Exit status follows diff(1) (POSIX.1-2017, "diff", EXIT STATUS): 0 no differences, 1 differences, >1 trouble.
describe("npm run inspect", () => {
  it("exits 0 on a clean sheet and prints a summary", () => {
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("clean.png"), "--pre-aligned");
    expect(run.stderr).toBe("");
    expect(run.code).toBe(0);
    expect(run.stdout).toMatch(/No findings\./);
    expect(run.stdout).toMatch(/spectrophotometer/);
  });

  it("exits 1 with --json: exactly one JSON object of the documented shape, the dot found in up 1", () => {
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("dot.png"), "--pre-aligned", "--ups", "1x2", "--json");
    expect(run.code).toBe(1);
    expect(run.stderr).toBe("");
    expect(run.stdout.trim().split("\n")).toHaveLength(1);
    const out = JSON.parse(run.stdout);
    expect(Object.keys(out)).toEqual(["alignment", "covered_mm", "drift", "findings", "timings_ms", "resolution"]);
    expect(Object.keys(out.alignment)).toEqual(["rotation_deg", "scale", "tx_mm", "ty_mm", "residual_px"]);
    expect(Object.keys(out.covered_mm)).toEqual(["x", "y", "w", "h"]);
    expect(Object.keys(out.drift)).toEqual(["deltaE00"]);
    expect(out.findings).toHaveLength(1);
    const f = out.findings[0];
    expect(Object.keys(f)).toEqual(["x_mm", "y_mm", "w_mm", "h_mm", "area_mm2", "kind", "deltaE00_mean", "deltaE00_max", "up"]);
    expect(f.kind).toBe("extra_ink");
    expect(f.up).toBe(1);
    expect(f.x_mm).toBeLessThanOrEqual(DOT.xMm - 0.5);
    expect(f.x_mm + f.w_mm).toBeGreaterThanOrEqual(DOT.xMm + 0.5);
    expect(f.y_mm).toBeLessThanOrEqual(DOT.yMm - 0.5);
    expect(f.y_mm + f.h_mm).toBeGreaterThanOrEqual(DOT.yMm + 0.5);
    expect(out.covered_mm.w).toBeCloseTo(200, 0);
    expect(typeof out.timings_ms.rasterise).toBe("number");
  });

  it("--annotate writes a PNG of the artwork with the finding boxed, and leaves no temporary file", async () => {
    const out = file("annotated.png");
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("dot.png"), "--pre-aligned", "--annotate", out);
    expect(run.code).toBe(1);
    const { data, info } = await sharp(out).raw().toBuffer({ resolveWithObject: true });
    const art = await sharp(file("clean.png")).metadata();
    expect([info.width, info.height]).toEqual([art.width, art.height]);
    let red = 0;
    for (let i = 0; i < data.length; i += info.channels) if (data[i] > 180 && data[i + 1] < 60 && data[i + 2] < 60) red++;
    expect(red).toBeGreaterThan(20);
    expect(readdirSync(dir).filter((n) => n.endsWith(".tmp"))).toEqual([]);
  });

  it("aligns a scan turned 0.4° on the glass and finds nothing on the clean sheet", () => {
    const run = inspect("--artwork", file("artwork.pdf"), "--scan", file("turned.png"), "--json");
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout);
    expect(Math.abs(Math.abs(out.alignment.rotation_deg) - 0.4)).toBeLessThan(0.05);
    expect(out.alignment.scale).toBeCloseTo(1, 2);
    expect(out.findings).toEqual([]);
    expect(run.code).toBe(0);
  });

  it.each([
    ["a missing scan file", ["--artwork", "ART", "--scan", "MISSING"], /^error: file_unreadable: /],
    ["an artwork that is not a PDF", ["--artwork", "NOTES", "--scan", "CLEAN"], /^error: not_a_pdf: /],
    ["a malformed --ups", ["--artwork", "ART", "--scan", "CLEAN", "--ups", "three"], /^error: usage: /],
    ["an unknown option", ["--artwork", "ART", "--scan", "CLEAN", "--colour"], /^error: usage: /],
    ["an unknown profile", ["--artwork", "ART", "--scan", "CLEAN", "--profile", "nonesuch", "--pre-aligned"], /^error: unknown_profile: /],
  ])("exits 2 with one line on stderr for %s", (_label, args, pattern) => {
    const names: Record<string, string> = { ART: "artwork.pdf", MISSING: "missing.tif", NOTES: "notes.pdf", CLEAN: "clean.png" };
    const run = inspect(...args.map((a) => (names[a] ? file(names[a]) : a)), "--json");
    expect(run.code).toBe(2);
    expect(run.stdout).toBe("");
    expect(run.stderr.split("\n").filter(Boolean)).toHaveLength(1);
    expect(run.stderr).toMatch(pattern);
  });
});
