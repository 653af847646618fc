// Run by scripts/demo.sh once the services, the seed and the worker are up: leaves a demo job with an approved,
// invented carton artwork and a short press run of simulated scans, inspected by the real worker, so a
// reviewer who signs in sees findings at once. Uses the same upload and storage code as the app.
// Safe to run again: an existing approved revision and sheets already uploaded are kept, never duplicated.
process.env.NEXT_TELEMETRY_DISABLED = "1";
import { and, desc, eq } from "drizzle-orm";
import sharp from "sharp";
import { closeDb, db } from "../db/client";
import { artworkRevisions, customers, inspections, jobs, scans, users } from "../db/schema";
import type { Actor } from "../lib/auth/policy";
import { rasterisePage } from "../lib/imaging/rasterise/rasterise";
import { approveArtwork, currentApprovedRevision, uploadArtwork } from "../lib/pipeline/artworks";
import { retryInspection } from "../lib/pipeline/inspections";
import { countFindings } from "../lib/pipeline/records";
import { uploadScans } from "../lib/pipeline/scans";
import { closeQueues } from "../lib/queue/queues";
import { ensureBucket, getObjectBuffer } from "../storage/objects";
import { makeCartonPdf, type CartonOptions } from "../tests/support/carton";
import { simulateSheet, type SimulateOptions } from "../tests/support/simulator/index";

// Overridable so a second demo job can be made beside the first (e.g. on the test services).
const JOB_NUMBER = process.env.DEMO_JOB_NUMBER ?? "WF-24130";
const CUSTOMER = "Kestrelmoor Tea Company";
// Fonts embedded, as a print-ready artwork PDF has them (the job page warns about any that are not).
const CARTON: CartonOptions = { widthMm: 297, heightMm: 210, rows: 2, columns: 3, embedFonts: true };
const PROFILE = "standard-food";
const WAIT_MS = 10 * 60_000;

interface DemoSheet {
  sheetNumber: number;
  what: string;
  /** What was printed differs from the artwork (a changed word), else the artwork itself. */
  changedWord?: CartonOptions["changedWord"];
  defects?: SimulateOptions["defects"];
  rotationDeg: number;
}

// Placement and defects are invented; the felt-tip dot is 1.2 mm across, in up 1's panel area.
const SHEETS: DemoSheet[] = [
  { sheetNumber: 101, what: "clean sheet", rotationDeg: 0.35 },
  { sheetNumber: 102, what: "felt-tip dot", rotationDeg: -0.5, defects: [{ type: "dot", xMm: 40, yMm: 60, diameterMm: 1.2 }] },
  // "250 ml" printed as "2500 ml" in up 5's 6 pt brewing instructions: an extra zero, a classic proofing miss.
  { sheetNumber: 103, what: "changed word", rotationDeg: 0.2, changedWord: { up: 5, replacement: "2500" } },
];

const log = (line: string) => console.log(`demo run: ${line}`);

async function actorFor(role: "prepress" | "qa"): Promise<Actor> {
  const [u] = await db.select().from(users).where(and(eq(users.role, role), eq(users.disabled, false))).limit(1);
  if (!u) throw new Error(`No ${role} user: run the seed (npm run db:seed) first.`);
  return { id: u.id, role: u.role, customerId: u.customerId, name: u.name, email: u.email };
}

function multipart(name: string, data: Uint8Array, fields: Record<string, string> = {}): Request {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  form.append("file", new Blob([new Uint8Array(data)]), name);
  return new Request("http://127.0.0.1/demo-run", { method: "POST", body: form });
}

async function demoJob(): Promise<number> {
  const [found] = await db.select({ id: jobs.id }).from(jobs).where(eq(jobs.jobNumber, JOB_NUMBER));
  if (found) return found.id;
  const [customer] = await db.select({ id: customers.id }).from(customers).where(eq(customers.name, CUSTOMER));
  if (!customer) throw new Error(`Customer ${CUSTOMER} is missing: run the seed first.`);
  const [{ id }] = await db
    .insert(jobs)
    .values({
      customerId: customer.id,
      jobNumber: JOB_NUMBER,
      title: "Brindlewood apple & cinnamon tea, 20 bags, carton (demo press run)",
      stock: "GC1 folding boxboard 300 g/m²",
      press: "Sheet-fed offset, 6 colours + coater",
      status: "on_press",
      artworkDpi: 300,
      upsRows: CARTON.rows,
      upsColumns: CARTON.columns,
    })
    .$returningId();
  return id;
}

async function until<T>(what: string, probe: () => Promise<T | null>): Promise<T> {
  const end = Date.now() + WAIT_MS;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > end) throw new Error(`Gave up waiting for ${what} after ${WAIT_MS / 60_000} minutes; is the worker running?`);
    await new Promise((r) => setTimeout(r, 500));
  }
}

/** The approved artwork of the demo job: uploaded and approved on the first run only. */
async function approvedArtwork(jobId: number, prepress: Actor) {
  let revision = await currentApprovedRevision(jobId);
  if (!revision) {
    const { pdf } = await makeCartonPdf(CARTON);
    const uploaded = await uploadArtwork(prepress, jobId, multipart("brindlewood-apple-cinnamon-sheet.pdf", pdf));
    await approveArtwork(prepress, uploaded.revisionId);
    log(`artwork revision ${uploaded.revision} uploaded and approved`);
  }
  revision = await until("the artwork raster", async () => {
    const r = await currentApprovedRevision(jobId);
    if (r?.rasterStatus === "failed") throw new Error(`The demo artwork could not be rasterised: ${r.rasterError}`);
    return r?.rasterStatus === "ready" ? r : null;
  });
  return revision;
}

/** A simulated flatbed scan of one printed sheet, as a 300 dpi LZW TIFF like a scanner would write. */
async function scanOf(sheet: DemoSheet, artworkPdf: Uint8Array, dpi: number): Promise<Buffer> {
  const artwork = await rasterisePage(artworkPdf, { dpi });
  let printed;
  if (sheet.changedWord) {
    const { pdf } = await makeCartonPdf({ ...CARTON, changedWord: sheet.changedWord });
    printed = await rasterisePage(pdf, { dpi });
  }
  const { scan } = await simulateSheet(artwork, {
    seed: sheet.sheetNumber,
    printed,
    defects: sheet.defects,
    geometry: { rotationDeg: sheet.rotationDeg, marginMm: 4 },
    photometric: { press: { density: 1.04 }, scanner: { blurMm: 0.04, noise: 1.5 } },
  });
  return sharp(scan.data, { raw: { width: scan.width, height: scan.height, channels: 4 } })
    .removeAlpha()
    .withMetadata({ density: dpi })
    .tiff({ compression: "lzw" })
    .toBuffer();
}

async function main() {
  await ensureBucket();
  const [prepress, qa] = [await actorFor("prepress"), await actorFor("qa")];
  const jobId = await demoJob();
  const revision = await approvedArtwork(jobId, prepress);
  const artworkPdf = new Uint8Array(await getObjectBuffer(revision.sourceKey));
  const dpi = revision.rasterDpi ?? 300;

  const started = new Map<number, number>();
  for (const sheet of SHEETS) {
    const [existing] = await db
      .select({ id: scans.id })
      .from(scans)
      .where(and(eq(scans.jobId, jobId), eq(scans.sheetNumber, sheet.sheetNumber)));
    if (existing) {
      // A sheet whose inspection failed on an earlier run (worker stopped, a fault since fixed) is tried again.
      const [last] = await db.select().from(inspections).where(eq(inspections.scanId, existing.id)).orderBy(desc(inspections.id)).limit(1);
      if (last?.status === "failed") {
        await retryInspection(qa, last.id);
        started.set(sheet.sheetNumber, Date.now());
        log(`sheet ${sheet.sheetNumber} (${sheet.what}): inspection failed before, queued again`);
      }
      continue;
    }
    const tiff = await scanOf(sheet, artworkPdf, dpi);
    const t0 = Date.now();
    const { items } = await uploadScans(qa, jobId, multipart(`sheet-${String(sheet.sheetNumber).padStart(4, "0")}.tif`, tiff, { profile: PROFILE }));
    started.set(sheet.sheetNumber, t0);
    log(`sheet ${sheet.sheetNumber} (${sheet.what}): ${items[0].message}`);
  }

  for (const sheet of SHEETS) {
    const row = await until(`sheet ${sheet.sheetNumber}`, async () => {
      const [r] = await db
        .select({ inspection: inspections })
        .from(inspections)
        .innerJoin(scans, eq(scans.id, inspections.scanId))
        .where(and(eq(scans.jobId, jobId), eq(scans.sheetNumber, sheet.sheetNumber)))
        .orderBy(desc(inspections.id))
        .limit(1);
      return r && (r.inspection.status === "done" || r.inspection.status === "failed") ? r.inspection : null;
    });
    const t0 = started.get(sheet.sheetNumber);
    const took = t0 ? `, ${((Date.now() - t0) / 1000).toFixed(1)} s from upload to findings` : " (inspected earlier)";
    if (row.status === "done") {
      log(`sheet ${sheet.sheetNumber} (${sheet.what}): ${await countFindings(row.id)} findings${took}`);
    } else {
      log(`sheet ${sheet.sheetNumber} (${sheet.what}): inspection failed: ${row.errorMessage}`);
    }
  }
  const [{ revision: rev }] = await db.select({ revision: artworkRevisions.revision }).from(artworkRevisions).where(eq(artworkRevisions.id, revision.id));
  log(`job ${JOB_NUMBER} (revision ${rev}) is ready for review at /jobs/${jobId}`);
}

main()
  .catch((error) => {
    console.error("demo run failed:", error instanceof Error ? error.message : error);
    process.exitCode = 1;
  })
  .finally(async () => {
    await closeQueues().catch(() => undefined);
    await closeDb().catch(() => undefined);
  });
