// Loading a job for an actor: a job the actor may not read is "not found" (a customer user learns nothing about
// other customers' jobs); a job they may read but not act on is "forbidden".
import { eq, sql } from "drizzle-orm";
import { db, prepared, type Db, type Tx } from "@/db/client";
import { customers, jobs, type Job } from "@/db/schema";
import { authorize, can, type Action, type Actor } from "@/lib/auth/policy";
import { AppError, notFound } from "@/lib/errors";

export type JobWithCustomer = Job & { customerName: string };

export function parseId(value: string | undefined, what: string): number {
  // Digits only: Number() would also read "0x10", "1e3" or " 7 " as ids.
  const id = /^\d{1,15}$/.test(value ?? "") ? Number(value) : NaN;
  if (!Number.isSafeInteger(id) || id <= 0) throw notFound(what);
  return id;
}

const jobWithCustomer = (executor: Db | Tx) =>
  executor
    .select({ job: jobs, customerName: customers.name })
    .from(jobs)
    .innerJoin(customers, eq(customers.id, jobs.customerId))
    .where(eq(jobs.id, sql.placeholder("jobId")))
    .limit(1);
const jobQuery = prepared((database) => jobWithCustomer(database).prepare());

export async function loadJobFor(actor: Actor, jobId: number, action: Action, executor: Db | Tx = db): Promise<JobWithCustomer> {
  // The shared handle uses the query prepared once; a transaction prepares its own.
  const [row] = await (executor === db ? jobQuery() : jobWithCustomer(executor).prepare()).execute({ jobId });
  if (!row || !can(actor, "job.read", { customerId: row.job.customerId })) throw notFound("The job");
  authorize(actor, action, { customerId: row.job.customerId });
  return { ...row.job, customerName: row.customerName };
}

export const conflict = (code: string, message: string) => new AppError(code, message, 409);
