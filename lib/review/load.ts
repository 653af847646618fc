// Loading one inspection for an actor, with its scan, artwork revision and job. Like a job, an inspection the
// actor may not read is "not found" (a customer user learns nothing about other customers' sheets).
import { and, eq, sql } from "drizzle-orm";
import { db, type Db, type Tx } from "@/db/client";
import { artworkRevisions, customers, findings, inspections, jobs, scans } from "@/db/schema";
import { authorize, can, type Action, type Actor } from "@/lib/auth/policy";
import { notFound } from "@/lib/errors";

/**
 * `findingId`: also one finding of this sheet (null when it is not one of the sheet's), in the same statement, so a
 * decision locks the sheet and its finding in one exchange with the database.
 */
export async function loadSheetFor(actor: Actor, inspectionId: number, action: Action, executor: Db | Tx = db, lock = false, findingId?: number) {
  const query = executor
    .select({ inspection: inspections, scan: scans, revision: artworkRevisions, job: jobs, customerName: customers.name, finding: findings })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(artworkRevisions, eq(artworkRevisions.id, inspections.artworkRevisionId))
    .innerJoin(jobs, eq(jobs.id, scans.jobId))
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .leftJoin(findings, findingId === undefined ? sql`false` : and(eq(findings.id, findingId), eq(findings.inspectionId, inspections.id)))
    .where(eq(inspections.id, inspectionId))
    .limit(1);
  // FOR UPDATE on the inspection row serialises decisions and sign-off of one sheet.
  const [row] = lock ? await query.for("update") : await query;
  const resource = row ? { customerId: row.job.customerId } : undefined;
  if (!row || !can(actor, "job.read", resource) || !can(actor, "inspection.read", resource)) throw notFound("The sheet");
  authorize(actor, action, resource);
  return row;
}

export type SheetRow = Awaited<ReturnType<typeof loadSheetFor>>;
