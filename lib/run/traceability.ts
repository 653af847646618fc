// A press run as a whole: a job's artwork revision and the sheets pulled from its run, in sheet-number order, each
// with its inspection, verdict and signature; how much of the run was sampled; the spans to pull around failed
// sheets; and per sheet the figures of the run chart. Customer users read only their own customer's runs (another
// customer's is "not found", like the job).
import { and, desc, eq, inArray, isNull } from "drizzle-orm";
import { db } from "@/db/client";
import { artworkRevisions, customers, findings, inspections, jobs, scans, sheetSignoffs, toleranceProfiles, type ArtworkRevision } from "@/db/schema";
import { authorize, type Actor } from "@/lib/auth/policy";
import { notFound } from "@/lib/errors";
import { loadJobFor, type JobWithCustomer } from "@/lib/pipeline/access";
import { describeSampling, describeSpan, spansToPull, type SpanToPull } from "./spans";

export interface RunSheet {
  scanId: number;
  inspectionId: number | null;
  sheetNumber: number | null;
  scanFileName: string;
  scanSha256: string;
  uploadedAt: string;
  status: "queued" | "running" | "done" | "failed" | null;
  verdict: "pending" | "passed" | "failed";
  inspectedAt: string | null;
  driftDeltaE00: number | null;
  findings: number;
  rejectedFindings: number;
  repeatingFindings: number;
  everyUpFindings: number;
  signedBy: string | null;
  signedAt: string | null;
  signatureMeaning: string | null;
  recordSha256: string | null;
  /** For a failed sheet, the span it calls for, in words. */
  spanToPull: string | null;
}

export interface RunSpan extends SpanToPull {
  text: string;
  sheets: number | null;
}

export interface RunView {
  job: { id: number; jobNumber: string; title: string; customerName: string; customerId: number; runLengthSheets: number | null };
  revision: { id: number; revision: number; fileName: string; sha256: string; status: "draft" | "approved" | "superseded" };
  /** Every revision of the job that has sheets, for moving between runs. */
  runs: { revisionId: number; revision: number; sheets: number }[];
  profile: { name: string; label: string; deltaE00Threshold: number } | null;
  /** Sheets with a number in sheet-number order, then those without. */
  sheets: RunSheet[];
  inspected: number;
  sampling: string;
  spans: RunSpan[];
}

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

/** The run of revision number `revisionNumber`, else of the current approved revision, else of the newest with sheets. */
async function chooseRevision(jobId: number, revisionNumber?: number) {
  const rows = await db.select().from(artworkRevisions).where(eq(artworkRevisions.jobId, jobId)).orderBy(desc(artworkRevisions.revision));
  const counts = rows.length
    ? await db.select({ revisionId: scans.artworkRevisionId }).from(scans).where(inArray(scans.artworkRevisionId, rows.map((r) => r.id)))
    : [];
  const runs = rows
    .map((r) => ({ revisionId: r.id, revision: r.revision, sheets: counts.filter((c) => c.revisionId === r.id).length }))
    .filter((r) => r.sheets > 0 || r.revisionId === rows.find((x) => x.status === "approved")?.id);
  const chosen =
    revisionNumber !== undefined
      ? rows.find((r) => r.revision === revisionNumber)
      : (rows.find((r) => r.status === "approved") ?? rows.find((r) => runs.some((x) => x.revisionId === r.id)));
  return { chosen, runs };
}

export async function getRunView(actor: Actor, jobId: number, revisionNumber?: number): Promise<RunView> {
  const job = await loadJobFor(actor, jobId, "job.read");
  authorize(actor, "inspection.read", { customerId: job.customerId });
  const { chosen: revision, runs } = await chooseRevision(job.id, revisionNumber);
  if (!revision) throw notFound("The press run");
  return buildRunView(job, revision, runs);
}

/** The run of one revision without an actor: for the worker's e-mails only (they go to the plant's own staff). */
export async function runOfRevision(revisionId: number): Promise<RunView | null> {
  const [row] = await db
    .select({ revision: artworkRevisions, job: jobs, customerName: customers.name })
    .from(artworkRevisions)
    .innerJoin(jobs, eq(jobs.id, artworkRevisions.jobId))
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(eq(artworkRevisions.id, revisionId));
  if (!row) return null;
  const { runs } = await chooseRevision(row.job.id);
  return buildRunView({ ...row.job, customerName: row.customerName }, row.revision, runs);
}

async function buildRunView(job: JobWithCustomer, revision: ArtworkRevision, runs: RunView["runs"]): Promise<RunView> {
  const scanRows = await db.select().from(scans).where(and(eq(scans.jobId, job.id), eq(scans.artworkRevisionId, revision.id)));
  const inspectionRows = scanRows.length
    ? await db
        .select({ inspection: inspections, profile: toleranceProfiles })
        .from(inspections)
        .innerJoin(toleranceProfiles, eq(toleranceProfiles.id, inspections.toleranceProfileId))
        .where(inArray(inspections.scanId, scanRows.map((s) => s.id)))
    : [];
  // The newest inspection of a scan is the one that counts.
  const newest = new Map<number, (typeof inspectionRows)[number]>();
  for (const r of inspectionRows) if ((newest.get(r.inspection.scanId)?.inspection.id ?? 0) < r.inspection.id) newest.set(r.inspection.scanId, r);
  const ids = [...newest.values()].map((r) => r.inspection.id);
  const findingRows = ids.length
    ? await db.select({ inspectionId: findings.inspectionId, decision: findings.decision, recurrence: findings.recurrence }).from(findings).where(inArray(findings.inspectionId, ids))
    : [];
  const signoffs = ids.length
    ? await db.select().from(sheetSignoffs).where(and(inArray(sheetSignoffs.inspectionId, ids), isNull(sheetSignoffs.reopenedAt)))
    : [];

  const spans = spansToPull(
    scanRows.flatMap((s) => (s.sheetNumber === null ? [] : [{ sheetNumber: s.sheetNumber, verdict: newest.get(s.id)?.inspection.verdict ?? "pending" }])),
  );
  const spanOf = (n: number) => spans.find((span) => span.failedSheets.includes(n));
  const sheets: RunSheet[] = scanRows.map((s) => {
    const i = newest.get(s.id)?.inspection;
    const own = i ? findingRows.filter((f) => f.inspectionId === i.id) : [];
    const signoff = i ? signoffs.filter((x) => x.inspectionId === i.id).sort((a, b) => b.id - a.id)[0] : undefined;
    const verdict = i?.verdict ?? "pending";
    const span = verdict === "failed" && s.sheetNumber !== null ? spanOf(s.sheetNumber) : undefined;
    return {
      scanId: s.id,
      inspectionId: i?.id ?? null,
      sheetNumber: s.sheetNumber,
      scanFileName: s.originalFilename,
      scanSha256: s.sha256,
      uploadedAt: s.createdAt.toISOString(),
      status: i?.status ?? null,
      verdict,
      inspectedAt: i?.status === "done" ? iso(i.finishedAt) : null,
      driftDeltaE00: i?.status === "done" ? i.driftDeltaE00 : null,
      findings: own.length,
      rejectedFindings: own.filter((f) => f.decision === "rejected").length,
      repeatingFindings: own.filter((f) => f.recurrence === "repeating").length,
      everyUpFindings: own.filter((f) => f.recurrence === "every_up").length,
      signedBy: signoff?.signerName ?? null,
      signedAt: iso(signoff?.signedAt),
      signatureMeaning: signoff?.meaning ?? null,
      recordSha256: signoff?.recordSha256 ?? null,
      spanToPull: span ? describeSpan(span) : null,
    };
  });
  sheets.sort((a, b) => (a.sheetNumber ?? Infinity) - (b.sheetNumber ?? Infinity) || a.scanId - b.scanId);
  const inspected = sheets.filter((s) => s.status === "done").length;
  // The profile of the newest inspection: its limits are the ones the chart draws.
  const latest = [...newest.values()].sort((a, b) => b.inspection.id - a.inspection.id)[0]?.profile;
  return {
    job: { id: job.id, jobNumber: job.jobNumber, title: job.title, customerName: job.customerName, customerId: job.customerId, runLengthSheets: job.runLengthSheets },
    revision: { id: revision.id, revision: revision.revision, fileName: revision.originalFilename, sha256: revision.sourceSha256, status: revision.status },
    runs,
    profile: latest ? { name: latest.name, label: latest.label, deltaE00Threshold: latest.deltaE00Threshold } : null,
    sheets,
    inspected,
    sampling: describeSampling(inspected, job.runLengthSheets),
    spans: spans.map((span) => ({ ...span, text: describeSpan(span), sheets: span.from === null || span.to === null ? null : span.to - span.from + 1 })),
  };
}

/** The span to pull that a failed sheet calls for, as the run stands now: "sheets 101 to 199 (99 sheets)". */
export async function spanToPullOf(inspectionId: number): Promise<string | null> {
  const [row] = await db.select({ revisionId: scans.artworkRevisionId }).from(inspections).innerJoin(scans, eq(scans.id, inspections.scanId)).where(eq(inspections.id, inspectionId));
  const run = row ? await runOfRevision(row.revisionId) : null;
  const sheetNumber = run?.sheets.find((s) => s.inspectionId === inspectionId)?.sheetNumber;
  const span = sheetNumber != null ? run?.spans.find((x) => x.failedSheets.includes(sheetNumber)) : undefined;
  if (!span) return null;
  return span.sheets === null ? span.text : `${span.text} (${span.sheets} sheet${span.sheets === 1 ? "" : "s"})`;
}
