// Loading one inspection for an actor, with its scan, artwork revision and job. Like a job, an inspection the
// actor may not read is "not found" (a customer user learns nothing about other customers' sheets).
import { and, eq } from "drizzle-orm";
import { db, type Db, type Tx } from "@/db/client";
import { artworkRevisions, customers, findings, inspections, jobs, scans } from "@/db/schema";
import { authorize, can, type Action, type Actor } from "@/lib/auth/policy";
import { notFound } from "@/lib/errors";

function allow(actor: Actor, customerId: number | undefined, action: Action) {
  const resource = customerId === undefined ? undefined : { customerId };
  if (!resource || !can(actor, "job.read", resource) || !can(actor, "inspection.read", resource)) throw notFound("The sheet");
  authorize(actor, action, resource);
}

export async function loadSheetFor(actor: Actor, inspectionId: number, action: Action, executor: Db | Tx = db, lock = false) {
  const query = executor
    .select({ inspection: inspections, scan: scans, revision: artworkRevisions, job: jobs, customerName: customers.name })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(artworkRevisions, eq(artworkRevisions.id, inspections.artworkRevisionId))
    .innerJoin(jobs, eq(jobs.id, scans.jobId))
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(eq(inspections.id, inspectionId))
    .limit(1);
  // FOR UPDATE on the inspection row serialises decisions and sign-off of one sheet.
  const [row] = lock ? await query.for("update") : await query;
  allow(actor, row?.job.customerId, action);
  return row!;
}

export type SheetRow = Awaited<ReturnType<typeof loadSheetFor>>;

/**
 * A decision's first step, in one statement, with only the columns a decision reads: the inspection, its scan and
 * job, and the run's revision row locked (the lock on the revision serialises the decisions of one run, which run
 * memory needs), with one finding of the sheet (null when it is not one of the sheet's), locked too.
 */
export async function lockSheetForDecision(actor: Actor, inspectionId: number, findingId: number, tx: Tx) {
  const [row] = await tx
    .select({
      inspection: { verdict: inspections.verdict, status: inspections.status },
      revisionId: scans.artworkRevisionId,
      jobId: jobs.id,
      customerId: jobs.customerId,
      finding: findings,
    })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .innerJoin(artworkRevisions, eq(artworkRevisions.id, scans.artworkRevisionId))
    .innerJoin(jobs, eq(jobs.id, scans.jobId))
    .leftJoin(findings, and(eq(findings.id, findingId), eq(findings.inspectionId, inspections.id)))
    .where(eq(inspections.id, inspectionId))
    .limit(1)
    .for("update");
  allow(actor, row?.customerId, "finding.decide");
  return row!;
}
