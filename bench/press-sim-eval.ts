// The engine on the second, independent simulator (tests/support/press-sim): every case goes through the CLI as
// a printer would run it (`npm run inspect -- --artwork A --scan S --json`), one child process a case, timed
// whole, with its peak RSS. Scores: false regions per clean sheet, recall (loose and tight boxes), recall of
// defects ≥ 0.5 mm at 300 dpi, refusals (false and correct) and kind accuracy.
//
//   npx tsx bench/press-sim-eval.ts --set heldout --seeds 5000-5011 [--data DIR] [--results FILE] [--runs FILE.jsonl]
//
// With --data, cases already in DIR (case-SEED/truth.json) are used and missing ones are made there; without it
// they are made in a temporary folder. With --runs, each case's run is appended to FILE.jsonl and runs already
// there are reused (to resume, or to re-score without running the engine again). Held-out seeds (5000–5999) are for reporting only: tune on training seeds.
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { appendFile, mkdir, readFile, rename, rm, writeFile } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { parseArgs } from "node:util";
import { makeCase, type Truth, type TruthDefect } from "../tests/support/press-sim/case";
import { HELD_OUT, parseSeeds, seedSet, TRAINING, type SeedSet } from "../tests/support/press-sim/seeds";

interface CliFinding { x_mm: number; y_mm: number; w_mm: number; h_mm: number; area_mm2: number; kind: string }

export interface CaseRun {
  truth: Truth;
  exitCode: number;
  error?: string;
  findings: CliFinding[];
  wallS: number;
  peakRssMiB: number | null;
}

export interface PressSimFigures {
  cases: number;
  cleanPlaced: number;
  falsePerClean: number;
  falseOnDefective: number;
  defects: number;
  recallLoose: number;
  recallTight: number;
  defects05at300: number;
  recall05at300Tight: number;
  kindRight: number;
  kindJudged: number;
  falseRefusals: number;
  shouldPlace: number;
  correctRefusals: number;
  shouldRefuse: number;
  wallMedianS: number;
  wallMaxS: number;
  peakRssMaxMiB: number | null;
}

const ROOT = path.resolve(import.meta.dirname, "..");
const TIME = existsSync("/usr/bin/time") ? "/usr/bin/time" : null;

/** Makes (or reuses) a case folder. */
async function ensureCase(dir: string, seed: number): Promise<string> {
  const caseDir = path.join(dir, `case-${seed}`);
  if (existsSync(path.join(caseDir, "truth.json"))) return caseDir;
  const c = await makeCase(seed);
  const temp = `${caseDir}.partial`;
  await rm(temp, { recursive: true, force: true });
  await mkdir(temp, { recursive: true });
  await writeFile(path.join(temp, "artwork.pdf"), c.artworkPdf);
  await writeFile(path.join(temp, c.truth.scan_file), c.scan);
  await writeFile(path.join(temp, "truth.json"), JSON.stringify(c.truth, null, 2) + "\n");
  await rename(temp, caseDir);
  return caseDir;
}

/** One CLI process, timed whole; peak RSS from GNU time (%M, KiB) when present. */
export async function runCase(caseDir: string): Promise<CaseRun> {
  const truth = JSON.parse(await readFile(path.join(caseDir, "truth.json"), "utf8")) as Truth;
  const cliArgs = ["run", "-s", "inspect", "--", "--artwork", path.join(caseDir, "artwork.pdf"), "--scan", path.join(caseDir, truth.scan_file), "--json"];
  if (truth.ups.count > 1) cliArgs.push("--ups", `${truth.ups.rows}x${truth.ups.columns}`);
  const rssFile = path.join(os.tmpdir(), `press-sim-rss-${process.pid}-${truth.seed}`);
  const [cmd, args] = TIME ? [TIME, ["-o", rssFile, "-f", "%M", "npm", ...cliArgs]] : ["npm", cliArgs];
  const started = performance.now();
  const { code, stdout, stderr } = await new Promise<{ code: number; stdout: string; stderr: string }>((resolve) => {
    execFile(cmd, args, { cwd: ROOT, maxBuffer: 64 << 20, env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } }, (err, stdout, stderr) => {
      const c = err ? (typeof (err as { code?: unknown }).code === "number" ? ((err as { code: number }).code) : 2) : 0;
      resolve({ code: c, stdout, stderr });
    });
  });
  const wallS = (performance.now() - started) / 1000;
  let peakRssMiB: number | null = null;
  if (TIME && existsSync(rssFile)) {
    const kib = Number(readFileSync(rssFile, "utf8").trim().split("\n").pop());
    if (Number.isFinite(kib)) peakRssMiB = kib / 1024;
    rmSync(rssFile, { force: true });
  }
  // GNU time exits with the child's code; a signal-killed child shows as a non-JSON stdout.
  let findings: CliFinding[] = [];
  if (code === 0 || code === 1) {
    try {
      findings = JSON.parse(stdout.trim().split("\n").pop()!).findings;
    } catch {
      return { truth, exitCode: 2, error: `unreadable output: ${stdout.slice(0, 200)}`, findings, wallS, peakRssMiB };
    }
  }
  const error = code === 2 || code > 2 ? stderr.trim().split("\n").filter((l) => l.startsWith("error:")).pop() ?? stderr.trim().slice(-200) : undefined;
  return { truth, exitCode: code, error, findings, wallS, peakRssMiB };
}

const touches = (f: CliFinding, d: TruthDefect, slack: number) =>
  f.x_mm <= d.box_mm.x + d.box_mm.w + slack && f.x_mm + f.w_mm >= d.box_mm.x - slack &&
  f.y_mm <= d.box_mm.y + d.box_mm.h + slack && f.y_mm + f.h_mm >= d.box_mm.y - slack;
/** Tight: the box is at most 4 × the defect's box area, or 400 mm², whichever is larger. */
const tight = (f: CliFinding, d: TruthDefect) => f.w_mm * f.h_mm <= Math.max(4 * d.box_mm.w * d.box_mm.h, 400);

export function score(runs: CaseRun[]): PressSimFigures {
  const placed = runs.filter((r) => r.truth.expect === "place");
  const refuse = runs.filter((r) => r.truth.expect === "refuse");
  const inspected = placed.filter((r) => r.exitCode === 0 || r.exitCode === 1);
  const falseOf = (r: CaseRun) => r.findings.filter((f) => ![...r.truth.defects, ...r.truth.ignored].some((d) => touches(f, d, 1))).length;
  const clean = inspected.filter((r) => r.truth.clean);
  const defective = inspected.filter((r) => !r.truth.clean);
  let defects = 0, loose = 0, tightN = 0, d05 = 0, d05found = 0, kindRight = 0, kindJudged = 0;
  // Defects on sheets the engine refused count as missed.
  for (const r of placed) {
    for (const d of r.truth.defects) {
      defects++;
      const near = r.findings.filter((f) => touches(f, d, 1));
      const isTight = near.some((f) => tight(f, d));
      if (near.length) loose++;
      if (isTight) tightN++;
      if (r.truth.dpi === 300 && d.size_mm >= 0.5) {
        d05++;
        if (isTight) d05found++;
      }
      if (near.length) {
        kindJudged++;
        // The kind of the smallest touching box: the one that most nearly marks this defect.
        const best = near.reduce((a, b) => (a.w_mm * a.h_mm <= b.w_mm * b.h_mm ? a : b));
        if (best.kind === d.kind) kindRight++;
      }
    }
  }
  const walls = runs.map((r) => r.wallS).sort((a, b) => a - b);
  const rss = runs.map((r) => r.peakRssMiB).filter((v): v is number => v !== null);
  return {
    cases: runs.length,
    cleanPlaced: clean.length,
    falsePerClean: clean.length ? clean.reduce((n, r) => n + falseOf(r), 0) / clean.length : NaN,
    falseOnDefective: defective.reduce((n, r) => n + falseOf(r), 0),
    defects,
    recallLoose: defects ? loose / defects : NaN,
    recallTight: defects ? tightN / defects : NaN,
    defects05at300: d05,
    recall05at300Tight: d05 ? d05found / d05 : NaN,
    kindRight,
    kindJudged,
    falseRefusals: placed.filter((r) => r.exitCode >= 2).length,
    shouldPlace: placed.length,
    correctRefusals: refuse.filter((r) => r.exitCode >= 2).length,
    shouldRefuse: refuse.length,
    wallMedianS: walls.length ? walls[Math.floor(walls.length / 2)] : NaN,
    wallMaxS: walls.length ? walls[walls.length - 1] : NaN,
    peakRssMaxMiB: rss.length ? Math.max(...rss) : null,
  };
}

const pct = (v: number) => (Number.isFinite(v) ? `${(100 * v).toFixed(1)} %` : "–");
const f2 = (v: number) => (Number.isFinite(v) ? v.toFixed(2) : "–");

export interface FirstSimulatorFigures {
  falsePerClean: number;
  recall: number;
}

/** Markdown: the figures (beside the first simulator's where it has them) and one row per case. */
export function markdown(set: SeedSet, seeds: number[], runs: CaseRun[], first?: FirstSimulatorFigures): string[] {
  const s = score(runs);
  const col = (v: string) => (first ? ` ${v} |` : "");
  const head = first ? "| measured | second simulator (press-sim) | first simulator | target |" : "| measured | second simulator (press-sim) | target |";
  return [
    `## Detection on the second simulator (press-sim, ${set === "heldout" ? "held-out" : "training"} seeds ${seeds[0]}–${seeds[seeds.length - 1]}), whole CLI process a case`,
    "",
    `${s.cases} cases made by tests/support/press-sim (Ghostscript as the press's RIP, AM screens, board texture, scanner light, ` +
      "JPEG/PNG/ICC-tagged TIFF, any quarter turn, partial scans, wrong-artwork and blank sheets), each run as `npm run inspect -- --json` " +
      `in its own process. ${set === "heldout" ? "Held-out seeds: nothing is tuned on them." : "Training seeds."} A finding is false when its box is more than 1 mm from every ` +
      "planted defect; a defect is found (loose) when a box comes within 1 mm of it, and tightly when that box is at most 4 × the defect's box area or 400 mm², whichever is larger. " +
      "Kind: the smallest box touching the defect.",
    "",
    head,
    first ? "|---|---:|---:|---|" : "|---|---:|---|",
    `| false regions per clean sheet (${s.cleanPlaced} clean sheets placed) | ${f2(s.falsePerClean)} |${col(f2(first?.falsePerClean ?? NaN))} ≤ 0.05 |`,
    `| false regions on defective sheets, total | ${s.falseOnDefective} |${col("–")} |`,
    `| recall, loose (${s.defects} defects) | ${pct(s.recallLoose)} |${col(pct(first?.recall ?? NaN) + " (within 0.5 mm)")} |`,
    `| recall, tight boxes | ${pct(s.recallTight)} |${col("–")} ≥ 95 % |`,
    `| recall of defects ≥ 0.5 mm at 300 dpi, tight (${s.defects05at300}) | ${pct(s.recall05at300Tight)} |${col("–")} 100 % |`,
    `| kind right (of defects found) | ${s.kindJudged ? `${s.kindRight}/${s.kindJudged} (${pct(s.kindRight / s.kindJudged)})` : "–"} |${col("–")} |`,
    `| false refusals (exit 2 on a scan to be placed) | ${s.falseRefusals}/${s.shouldPlace} |${col("–")} 0 |`,
    `| correct refusals (wrong artwork, blank sheet) | ${s.correctRefusals}/${s.shouldRefuse} |${col("–")} all |`,
    `| whole CLI process, median / max | ${f2(s.wallMedianS)} s / ${f2(s.wallMaxS)} s |${col("–")} |`,
    `| peak RSS, max over cases | ${s.peakRssMaxMiB === null ? "not measured" : `${s.peakRssMaxMiB.toFixed(0)} MiB`} |${col("–")} ≤ 2048 MiB |`,
    "",
    "| seed | template | ups | dpi | file | expect | exit | findings | false | found loose / tight / defects | wall s | RSS MiB |",
    "|---:|---|---:|---:|---|---|---:|---:|---:|---|---:|---:|",
    ...runs.map((r) => {
      const t = r.truth;
      const fl = r.findings.filter((f) => ![...t.defects, ...t.ignored].some((d) => touches(f, d, 1))).length;
      const lo = t.defects.filter((d) => r.findings.some((f) => touches(f, d, 1))).length;
      const ti = t.defects.filter((d) => r.findings.some((f) => touches(f, d, 1) && tight(f, d))).length;
      const expect = t.expect === "refuse" ? `refuse (${t.refuse_reason})` : `place${t.partial ? ", partial" : ""}${t.clean ? ", clean" : ""}`;
      return `| ${t.seed} | ${t.template} | ${t.ups.rows}×${t.ups.columns} | ${t.dpi} | ${t.format} | ${expect} | ${r.exitCode}${r.exitCode >= 2 && r.error ? ` (${r.error.replace(/^error: /, "").split(":")[0]})` : ""} | ` +
        `${r.findings.length} | ${fl} | ${lo} / ${ti} / ${t.defects.length} | ${r.wallS.toFixed(1)} | ${r.peakRssMiB === null ? "–" : r.peakRssMiB.toFixed(0)} |`;
    }),
    "",
  ];
}

/** Makes or reuses the cases and runs each through the CLI, one at a time (so times are per process). */
export async function evaluate(seeds: number[], dataDir?: string, log: (s: string) => void = console.error, runsFile?: string): Promise<CaseRun[]> {
  const dir = dataDir ?? mkdtempSync(path.join(os.tmpdir(), "press-sim-eval-"));
  // Runs already in the file (one JSON line a case) are kept, so a long evaluation can be resumed.
  const done = new Map<number, CaseRun>();
  if (runsFile && existsSync(runsFile)) {
    for (const line of readFileSync(runsFile, "utf8").split("\n").filter(Boolean)) {
      const r = JSON.parse(line) as CaseRun;
      done.set(r.truth.seed, r);
    }
  }
  try {
    const runs: CaseRun[] = [];
    for (const seed of seeds) {
      const kept = done.get(seed);
      if (kept) {
        runs.push(kept);
        continue;
      }
      const caseDir = await ensureCase(dir, seed);
      const r = await runCase(caseDir);
      log(`press-sim case ${seed}: exit ${r.exitCode}, ${r.findings.length} findings, ${r.wallS.toFixed(1)} s`);
      if (runsFile) await appendFile(runsFile, JSON.stringify(r) + "\n");
      runs.push(r);
    }
    return runs;
  } finally {
    if (!dataDir) rmSync(dir, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  const { values } = parseArgs({
    options: { seeds: { type: "string" }, set: { type: "string" }, data: { type: "string" }, results: { type: "string" }, runs: { type: "string" } },
  });
  const set = (values.set ?? "heldout") as SeedSet;
  if (set !== "training" && set !== "heldout") throw new Error("--set must be training or heldout");
  const range = set === "heldout" ? HELD_OUT : TRAINING;
  const seeds = parseSeeds(values.seeds ?? `${range.from}-${range.from + 11}`);
  const wrong = seeds.find((s) => seedSet(s) !== set);
  if (wrong !== undefined) throw new Error(`Seed ${wrong} is not in the ${set} range (${range.from}–${range.to}).`);
  const runs = await evaluate(seeds, values.data, console.error, values.runs);
  const text = markdown(set, seeds, runs).join("\n");
  if (values.results) await writeFile(values.results, text + "\n");
  process.stdout.write(text + "\n");
}

if (process.argv[1]?.endsWith("press-sim-eval.ts")) {
  main().catch((err) => {
    console.error(`error: ${(err as Error).message}`);
    process.exitCode = 2;
  });
}

/** Held-out cases for `npm run bench`, kept in .data/press-sim/<hash of the simulator's source> between runs. */
export async function pressSimSection(quick: boolean, first: FirstSimulatorFigures, log: (s: string) => void): Promise<string[]> {
  const seeds = parseSeeds(quick ? `${HELD_OUT.from}-${HELD_OUT.from + 3}` : `${HELD_OUT.from}-${HELD_OUT.from + 11}`);
  const dataDir = path.join(ROOT, ".data", "press-sim", simulatorHash());
  log(`press-sim: ${seeds.length} held-out cases through the CLI (cases in ${path.relative(ROOT, dataDir)})`);
  await mkdir(dataDir, { recursive: true });
  return markdown("heldout", seeds, await evaluate(seeds, dataDir, log), first);
}

function simulatorHash(): string {
  const dir = path.join(ROOT, "tests", "support", "press-sim");
  const h = createHash("sha256");
  for (const f of readdirSync(dir).filter((f) => f.endsWith(".ts")).sort()) h.update(f).update(readFileSync(path.join(dir, f)));
  return h.digest("hex").slice(0, 12);
}
