// `npm run bench:load`: the API under load on loopback against the production build. 50 concurrent clients for
// 30 s on each of: the OpenAPI document (the framework's floor, a peer in the same run), a findings list, a job
// page's data, and finding decisions. For the decisions each client is a reviewer on a sheet of their own who
// accepts their finding and then rejects it, naming the version last seen, so every answer should be a 2xx and
// an error is a real one (an earlier version sent every client a rejection without a comment: all 422s).
// Writes its own section of bench/RESULTS.md (between the markers), leaving the engine's sections alone.
// Target: p95 < 100 ms on a 2-core machine, no errors (non-2xx count as errors). Expects the services and a
// migrated database in the environment (bench/load.sh sets them up).
import { spawn } from "node:child_process";
import { readFileSync, writeFileSync } from "node:fs";
import os from "node:os";
import autocannon from "autocannon";
import { closeDb, db } from "../db/client";
import { findings } from "../db/schema";
import { decisionRequests } from "./decision-requests";
import { createApiToken } from "../lib/auth/tokens";
import { addInspectedSheet, makePlant } from "../tests/api/support";

const PORT = Number(process.env.BENCH_PORT ?? 3690);
const BASE = `http://127.0.0.1:${PORT}`;
const CONNECTIONS = 50;
const DURATION_S = Number(process.env.BENCH_SECONDS ?? 30);
const MARK_START = "<!-- api-load:start -->";
const MARK_END = "<!-- api-load:end -->";

async function waitForApp() {
  for (let i = 0; i < 300; i++) {
    try {
      await fetch(`${BASE}/api/v1/openapi.json`);
      return;
    } catch {
      await new Promise((r) => setTimeout(r, 200));
    }
  }
  throw new Error("The app did not start");
}

async function main() {
  const plant = await makePlant();
  // One sheet with one finding per client, for the decision run.
  const sheets = [];
  for (let n = 0; n < CONNECTIONS; n++) sheets.push(await addInspectedSheet(plant.b, 1000 + n));
  // 40 findings on the listed inspection, as a busy sheet might have.
  await db.insert(findings).values(
    Array.from({ length: 40 }, (_, k) => ({ inspectionId: plant.a.inspectionId, xUm: k * 5000, yUm: 2000, wUm: 800, hUm: 600, areaUm2: 480_000 + k, deltaE00Mean: 5, deltaE00Max: 9, kind: "extra_ink" as const })),
  );
  const reader = (await createApiToken(null, plant.actors.qa.id, "load")).token;
  const reviewer = (await createApiToken(null, plant.actors.reviewer.id, "load")).token;

  // BENCH_CPU_PROF=DIR: the app writes a V8 CPU profile there when it stops (to look for hot paths).
  const profile = process.env.BENCH_CPU_PROF ? ["--cpu-prof", `--cpu-prof-dir=${process.env.BENCH_CPU_PROF}`] : [];
  const app = spawn(process.execPath, [...profile, "node_modules/next/dist/bin/next", "start", "-H", "127.0.0.1", "-p", String(PORT)], {
    env: { ...process.env, NODE_ENV: "production" },
    stdio: ["ignore", "ignore", "inherit"],
  });
  try {
    await waitForApp();
    const auth = (t: string) => ({ authorization: `Bearer ${t}` });
    const runs = [
      // The peer in the same run: what the framework alone answers on this machine now (no token, no database).
      { name: "Peer: the OpenAPI document (no token, no database)", path: "/api/v1/openapi.json", headers: {} },
      { name: "Findings list (40 findings)", path: `/api/v1/inspections/${plant.a.inspectionId}/findings?limit=100`, headers: auth(reader) },
      { name: "Job page's data", path: `/api/v1/jobs/${plant.a.jobId}`, headers: auth(reader) },
      {
        name: "Finding decision (accept, then reject, with the version last seen)",
        requests: decisionRequests(sheets, auth(reviewer)),
      },
    ];
    // Warm the routes so the first compiled-on-demand request is not measured.
    for (const r of runs) if ("path" in r) await autocannon({ url: BASE + r.path, headers: r.headers, connections: 5, duration: 2 });
    const rows: string[] = [];
    const loadBefore = os.loadavg().map((l) => l.toFixed(2)).join(" ");
    for (const r of runs) {
      const result = await autocannon({
        url: BASE,
        connections: CONNECTIONS,
        duration: DURATION_S,
        requests: "requests" in r ? r.requests : [{ method: "GET", path: r.path, headers: r.headers }],
      });
      const errors = result.errors + result.timeouts + result.non2xx;
      const codes = Object.entries((result.statusCodeStats ?? {}) as Record<string, { count: number }>).map(([code, s]) => `${code}: ${s.count}`).join(", ");
      console.log(`${r.name}: status codes ${codes}`);
      const p95 = (result.latency as unknown as Record<string, number>).p95 ?? result.latency.p97_5;
      rows.push(
        `| ${r.name} | ${result.latency.p50} | ${p95} | ${result.latency.p99} | ${Math.round(result.requests.average)} | ${result.requests.total} | ${errors} | ${p95 < 100 && errors === 0 ? "met" : "missed"} |`,
      );
      console.log(rows.at(-1));
    }
    const section = [
      MARK_START,
      "## API under load: 50 concurrent clients, 30 s each, production build on loopback",
      "",
      `Measured ${new Date().toISOString()} (load average ${loadBefore} before, ${os.loadavg().map((l) => l.toFixed(2)).join(" ")} after; the machine is shared) on ${os.cpus().length} cores (${os.cpus()[0]?.model ?? "unknown CPU"}), Node ${process.version}, the app in one process,`,
      "MariaDB, Redis and the S3 fake on the same machine; autocannon 9 (`npm run bench:load`). Bearer tokens; latency in ms.",
      "Target: p95 < 100 ms and no errors (errors = connection errors, timeouts and non-2xx answers).",
      "",
      "| request | p50 | p95 | p99 | requests/s | total | errors | target |",
      "|---|---|---|---|---|---|---|---|",
      ...rows,
      MARK_END,
    ].join("\n");
    const file = "bench/RESULTS.md";
    const current = readFileSync(file, "utf8");
    const start = current.indexOf(MARK_START);
    const end = current.indexOf(MARK_END);
    const updated = start >= 0 && end > start ? current.slice(0, start) + section + current.slice(end + MARK_END.length) : `${current.trimEnd()}\n\n${section}\n`;
    writeFileSync(file, updated);
  } finally {
    app.kill("SIGTERM");
    await closeDb();
  }
}

await main();
process.exit(0);
