// "What needs me now": the few things waiting for this person's role, oldest first, each with the job it is in.
// Prepress: artwork waiting for approval, artwork that could not be prepared. QA: inspections that failed and
// sheets signed as failed. Reviewer: sheets waiting for review. Customer: sheets of their jobs signed lately.
// Administrators see all of these. Customer users only ever see their own customer's jobs.
import { and, asc, desc, eq, gte, inArray, ne, sql, type SQL } from "drizzle-orm";
import { db } from "../../db/client";
import { artworkRevisions, customers, inspections, jobs, scans } from "../../db/schema";
import { can, customerScope, type Action, type Actor } from "../auth/policy";

export type AttentionKind = "artwork_to_approve" | "raster_failed" | "inspection_failed" | "sheet_failed" | "sheet_to_review" | "sheet_signed";

export interface AttentionItem {
  kind: AttentionKind;
  id: number;
  jobId: number;
  jobNumber: string;
  jobTitle: string;
  customerName: string;
  /** What the item is about, e.g. "Revision 2" or "Sheet 1047". */
  subject: string;
  detail: string | null;
  at: string;
}

export interface AttentionSection {
  kind: AttentionKind;
  items: AttentionItem[];
  /** All that wait, of which `items` shows the oldest (or, for signed sheets, the latest). */
  total: number;
}

export const ATTENTION_LIMIT = 8;
const SIGNED_LATELY_DAYS = 30;

const jobColumns = { jobId: jobs.id, jobNumber: jobs.jobNumber, jobTitle: jobs.title, customerName: customers.name, customerId: jobs.customerId };

function scopeOf(actor: Actor): SQL | undefined | null {
  const scope = customerScope(actor);
  if (scope === null) return null;
  return scope === "all" ? undefined : eq(jobs.customerId, scope);
}

async function count(query: Promise<{ n: number }[]>) {
  return (await query)[0]?.n ?? 0;
}
const countColumn = { n: sql<number>`count(*)`.mapWith(Number) };

type JobFields = { id: number; jobId: number; jobNumber: string; jobTitle: string; customerName: string; customerId: number };

/** The rows the policy lets the actor read (it has the last word, whatever the query did), as items. */
function itemsOf<R extends JobFields>(actor: Actor, action: Action, kind: AttentionKind, rows: R[], describe: (r: R) => { subject: string; detail: string | null; at: Date }): AttentionItem[] {
  return rows
    .filter((r) => can(actor, action, { customerId: r.customerId }))
    .map((r) => {
      const { subject, detail, at } = describe(r);
      return { kind, id: r.id, jobId: r.jobId, jobNumber: r.jobNumber, jobTitle: r.jobTitle, customerName: r.customerName, subject, detail, at: at.toISOString() };
    });
}

async function artworkSection(actor: Actor, kind: "artwork_to_approve" | "raster_failed", scope: SQL | undefined): Promise<AttentionSection> {
  const where = and(
    scope,
    ne(jobs.status, "cancelled"),
    kind === "artwork_to_approve" ? eq(artworkRevisions.status, "draft") : and(eq(artworkRevisions.status, "approved"), eq(artworkRevisions.rasterStatus, "failed")),
  );
  const [rows, total] = await Promise.all([
    db
      .select({ id: artworkRevisions.id, revision: artworkRevisions.revision, fileName: artworkRevisions.originalFilename, error: artworkRevisions.rasterError, at: kind === "artwork_to_approve" ? artworkRevisions.createdAt : artworkRevisions.updatedAt, ...jobColumns })
      .from(artworkRevisions)
      .innerJoin(jobs, eq(jobs.id, artworkRevisions.jobId))
      .innerJoin(customers, eq(customers.id, jobs.customerId))
      .where(where)
      .orderBy(asc(artworkRevisions.createdAt), asc(artworkRevisions.id))
      .limit(ATTENTION_LIMIT),
    count(db.select(countColumn).from(artworkRevisions).innerJoin(jobs, eq(jobs.id, artworkRevisions.jobId)).where(where)),
  ]);
  const items = itemsOf(actor, "job.read", kind, rows, (r) => ({ subject: `Revision ${r.revision}`, detail: kind === "raster_failed" ? r.error : r.fileName, at: r.at }));
  return { kind, items, total };
}

/** The newest inspection of each scan is the one that stands. */
const latestOfScan = sql`${inspections.id} = (select max(i2.id) from ${inspections} i2 where i2.scan_id = ${inspections.scanId})`;

async function sheetSection(actor: Actor, kind: "inspection_failed" | "sheet_failed" | "sheet_to_review" | "sheet_signed", scope: SQL | undefined): Promise<AttentionSection> {
  const since = new Date(Date.now() - SIGNED_LATELY_DAYS * 24 * 3600 * 1000);
  const condition = {
    inspection_failed: eq(inspections.status, "failed"),
    sheet_failed: and(eq(inspections.verdict, "failed"), gte(inspections.signedAt, since)),
    sheet_to_review: and(eq(inspections.status, "done"), eq(inspections.verdict, "pending")),
    sheet_signed: and(inArray(inspections.verdict, ["passed", "failed"]), gte(inspections.signedAt, since)),
  }[kind];
  const when = kind === "sheet_signed" || kind === "sheet_failed" ? inspections.signedAt : inspections.finishedAt;
  const where = and(scope, latestOfScan, condition);
  const [rows, total] = await Promise.all([
    db
      .select({ id: inspections.id, sheetNumber: scans.sheetNumber, fileName: scans.originalFilename, error: inspections.errorMessage, verdict: inspections.verdict, at: when, createdAt: inspections.createdAt, ...jobColumns })
      .from(inspections)
      .innerJoin(scans, eq(scans.id, inspections.scanId))
      .innerJoin(jobs, eq(jobs.id, scans.jobId))
      .innerJoin(customers, eq(customers.id, jobs.customerId))
      .where(where)
      // Waiting work oldest first; signed sheets newest first.
      .orderBy(kind === "sheet_signed" || kind === "sheet_failed" ? desc(when) : asc(when), asc(inspections.id))
      .limit(ATTENTION_LIMIT),
    count(db.select(countColumn).from(inspections).innerJoin(scans, eq(scans.id, inspections.scanId)).innerJoin(jobs, eq(jobs.id, scans.jobId)).where(where)),
  ]);
  const items = itemsOf(actor, "inspection.read", kind, rows, (r) => ({
    subject: r.sheetNumber ? `Sheet ${r.sheetNumber}` : r.fileName || `Scan of inspection ${r.id}`,
    detail: kind === "inspection_failed" ? r.error : kind === "sheet_signed" ? (r.verdict === "passed" ? "Passed" : "Failed") : null,
    at: r.at ?? r.createdAt,
  }));
  return { kind, items, total };
}

/** The sections for this actor's role, in the order the home page shows them. */
export async function whatNeedsMe(actor: Actor): Promise<AttentionSection[]> {
  const scope = scopeOf(actor);
  if (scope === null) return [];
  const wanted: AttentionKind[] = {
    admin: ["artwork_to_approve", "raster_failed", "inspection_failed", "sheet_to_review", "sheet_failed", "sheet_signed"],
    prepress: ["artwork_to_approve", "raster_failed"],
    qa: ["inspection_failed", "sheet_failed"],
    reviewer: ["sheet_to_review"],
    customer: ["sheet_signed"],
  }[actor.role] as AttentionKind[];
  return Promise.all(
    wanted.map((kind) =>
      kind === "artwork_to_approve" || kind === "raster_failed" ? artworkSection(actor, kind, scope) : sheetSection(actor, kind, scope),
    ),
  );
}
