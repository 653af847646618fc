// Jobs as the dashboard lists them, already cut down to what the actor may see: customer users get their own
// customer's jobs only, staff get every job. Returns only the fields the list shows.
import { desc, eq, sql, type SQL } from "drizzle-orm";
import { db } from "../../db/client";
import { customers, inspections, jobs, scans } from "../../db/schema";
import { can, customerScope, type Actor } from "../auth/policy";

export interface JobListItem {
  id: number;
  jobNumber: string;
  title: string;
  customerName: string;
  customerId: number;
  status: (typeof jobs.$inferSelect)["status"];
  press: string;
  scanCount: number;
  /** Inspections of this job whose sheet has not been signed off yet. */
  openSheetCount: number;
  updatedAt: Date;
}

/** The jobs matching `where`, with their customer and the fields job lists show (one query, counts included). */
export function selectJobList(where?: SQL) {
  const scanCount = sql<number>`(select count(*) from ${scans} where ${scans.jobId} = ${jobs.id})`.mapWith(Number);
  const openSheetCount = sql<number>`(select count(*) from ${inspections} join ${scans} on ${scans.id} = ${inspections.scanId}
    where ${scans.jobId} = ${jobs.id} and ${inspections.verdict} = 'pending')`.mapWith(Number);
  return db
    .select({
      id: jobs.id,
      jobNumber: jobs.jobNumber,
      title: jobs.title,
      customerName: customers.name,
      customerId: jobs.customerId,
      status: jobs.status,
      press: jobs.press,
      scanCount,
      openSheetCount,
      updatedAt: jobs.updatedAt,
    })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(where);
}

export async function listJobsForActor(actor: Actor): Promise<JobListItem[]> {
  const scope = customerScope(actor);
  if (scope === null) return [];
  const rows = await selectJobList(scope === "all" ? undefined : eq(jobs.customerId, scope)).orderBy(desc(jobs.updatedAt), desc(jobs.id));
  // The policy has the last word on every row, whatever the query did.
  return rows.filter((row) => can(actor, "job.read", { customerId: row.customerId }));
}
