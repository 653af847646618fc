// Print jobs: the paginated list, one job, creating and editing one (admin, prepress) and moving its status.
// Every function takes the actor and asks the policy; a customer user sees their own customer's jobs only and
// another customer's job is "not found". Each change writes its audit event in the same transaction.
import { and, asc, desc, eq, like, or, sql, type SQL } from "drizzle-orm";
import { db, type Tx } from "../../db/client";
import { customers, jobs, toleranceProfiles, type Job } from "../../db/schema";
import { recordAudit } from "../audit";
import { authorize, can, customerScope, type Actor } from "../auth/policy";
import { AppError, invalidInput } from "../errors";
import { loadJobFor } from "../pipeline/access";
import { selectJobList } from "./queries";
import { isDuplicateKey, parseInput, type Page } from "../validation";
import { STATUS_LABELS, STATUS_TRANSITIONS, jobInput, jobListQuery, jobStatusInput, type JobInput, type JobStatus } from "./schema";

export interface JobRow {
  id: number;
  jobNumber: string;
  title: string;
  customerId: number;
  customerName: string;
  status: JobStatus;
  press: string;
  scanCount: number;
  /** Inspected sheets not signed off yet. */
  openSheetCount: number;
  updatedAt: string;
}

export interface JobDetail {
  id: number;
  jobNumber: string;
  customerId: number;
  customerName: string;
  title: string;
  stock: string;
  boardThicknessMm: number | null;
  press: string;
  runLengthSheets: number | null;
  upsRows: number;
  upsColumns: number;
  artworkDpi: number;
  toleranceProfileId: number | null;
  toleranceProfileLabel: string | null;
  status: JobStatus;
  createdAt: string;
  updatedAt: string;
  /** The statuses this actor may move the job to now. */
  nextStatuses: JobStatus[];
  may: { update: boolean };
}

const escapeLike = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`);

export async function listJobs(actor: Actor, rawQuery: unknown): Promise<Page<JobRow>> {
  const query = parseInput(jobListQuery, rawQuery);
  const scope = customerScope(actor);
  // Staff ask the policy once; a customer user's rows are each checked below.
  if (scope === "all") authorize(actor, "job.read");
  if (scope === null) return { rows: [], total: 0, page: query.page, pageSize: query.pageSize };
  const conditions: SQL[] = [];
  if (scope !== "all") conditions.push(eq(jobs.customerId, scope));
  if (query.status) conditions.push(eq(jobs.status, query.status));
  if (query.customerId) conditions.push(eq(jobs.customerId, query.customerId));
  if (query.q) {
    const pattern = `%${escapeLike(query.q)}%`;
    conditions.push(or(like(jobs.jobNumber, pattern), like(jobs.title, pattern), like(customers.name, pattern))!);
  }
  const where = conditions.length ? and(...conditions) : undefined;
  const direction = query.dir === "desc" ? desc : asc;
  const column = { jobNumber: jobs.jobNumber, title: jobs.title, customer: customers.name, status: jobs.status, updated: jobs.updatedAt }[query.sort];
  const [rows, [{ total }]] = await Promise.all([
    selectJobList(where)
      .orderBy(direction(column), desc(jobs.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db
      .select({ total: sql<number>`count(*)`.mapWith(Number) })
      .from(jobs)
      .innerJoin(customers, eq(customers.id, jobs.customerId))
      .where(where),
  ]);
  // The policy has the last word on every row, whatever the query did.
  const visible = rows.filter((r) => can(actor, "job.read", { customerId: r.customerId }));
  return { rows: visible.map((r) => ({ ...r, updatedAt: r.updatedAt.toISOString() })), total, page: query.page, pageSize: query.pageSize };
}

export async function getJob(actor: Actor, jobId: number): Promise<JobDetail> {
  const job = await loadJobFor(actor, jobId, "job.read");
  const [profile] = job.toleranceProfileId
    ? await db.select({ label: toleranceProfiles.label }).from(toleranceProfiles).where(eq(toleranceProfiles.id, job.toleranceProfileId))
    : [];
  const mayUpdate = can(actor, "job.update", { customerId: job.customerId });
  return {
    id: job.id,
    jobNumber: job.jobNumber,
    customerId: job.customerId,
    customerName: job.customerName,
    title: job.title,
    stock: job.stock,
    boardThicknessMm: job.boardThicknessUm === null ? null : job.boardThicknessUm / 1000,
    press: job.press,
    runLengthSheets: job.runLengthSheets,
    upsRows: job.upsRows,
    upsColumns: job.upsColumns,
    artworkDpi: job.artworkDpi,
    toleranceProfileId: job.toleranceProfileId,
    toleranceProfileLabel: profile?.label ?? null,
    status: job.status,
    createdAt: job.createdAt.toISOString(),
    updatedAt: job.updatedAt.toISOString(),
    nextStatuses: mayUpdate ? [...STATUS_TRANSITIONS[job.status]] : [],
    may: { update: mayUpdate },
  };
}

/** What the job form offers: every customer and every tolerance profile. */
export async function jobFormOptions(actor: Actor) {
  if (!can(actor, "job.create")) authorize(actor, "job.update");
  const [customerRows, profileRows] = await Promise.all([
    db.select({ id: customers.id, name: customers.name }).from(customers).orderBy(asc(customers.name)),
    db.select({ id: toleranceProfiles.id, label: toleranceProfiles.label }).from(toleranceProfiles).orderBy(asc(toleranceProfiles.id)),
  ]);
  return { customers: customerRows, profiles: profileRows };
}

/** Checks the rows the input points at; a missing one is a field error, not a foreign-key failure. */
async function checkReferences(tx: Tx, input: JobInput) {
  const errors: Record<string, string[]> = {};
  const [customer] = await tx.select({ id: customers.id }).from(customers).where(eq(customers.id, input.customerId));
  if (!customer) errors.customerId = ["Choose a customer from the list."];
  if (input.toleranceProfileId) {
    const [profile] = await tx.select({ id: toleranceProfiles.id }).from(toleranceProfiles).where(eq(toleranceProfiles.id, input.toleranceProfileId));
    if (!profile) errors.toleranceProfileId = ["Choose a tolerance profile from the list."];
  }
  if (Object.keys(errors).length) throw invalidInput(errors);
}

function columnsOf(input: JobInput) {
  const { boardThicknessMm, ...rest } = input;
  return {
    ...rest,
    boardThicknessUm: boardThicknessMm === undefined ? null : Math.round(boardThicknessMm * 1000),
    runLengthSheets: input.runLengthSheets ?? null,
    toleranceProfileId: input.toleranceProfileId ?? null,
  };
}

const duplicateNumber = (jobNumber: string) => invalidInput({ jobNumber: [`Job number ${jobNumber} is already used by another job.`] });

export async function createJob(actor: Actor, rawInput: unknown): Promise<JobDetail> {
  authorize(actor, "job.create");
  const input = parseInput(jobInput, rawInput);
  try {
    const id = await db.transaction(async (tx) => {
      await checkReferences(tx, input);
      const [{ id }] = await tx.insert(jobs).values({ ...columnsOf(input), createdBy: actor.id }).$returningId();
      await recordAudit(tx, { actorId: actor.id, action: "job.create", subjectType: "job", subjectId: id, details: { jobId: id, ...input } });
      return id;
    });
    return getJob(actor, id);
  } catch (error) {
    if (isDuplicateKey(error)) throw duplicateNumber(input.jobNumber);
    throw error;
  }
}

/** The fields that changed, as { field: { from, to } }, for the audit trail. */
function changesOf(before: Job, after: ReturnType<typeof columnsOf>) {
  const changed: Record<string, { from: unknown; to: unknown }> = {};
  for (const [key, value] of Object.entries(after)) {
    const old = before[key as keyof Job];
    if (old !== value) changed[key] = { from: old, to: value };
  }
  return changed;
}

export async function updateJob(actor: Actor, jobId: number, rawInput: unknown): Promise<JobDetail> {
  let jobNumber = "";
  try {
    await db.transaction(async (tx) => {
      // The policy answers before the input is read: a caller who may not edit the job learns nothing more.
      const job = await loadJobFor(actor, jobId, "job.update", tx);
      const input = parseInput(jobInput, rawInput);
      jobNumber = input.jobNumber;
      await tx.select({ id: jobs.id }).from(jobs).where(eq(jobs.id, job.id)).for("update");
      if (job.status === "completed" || job.status === "cancelled") {
        throw new AppError("job_closed", `Job ${job.jobNumber} is ${STATUS_LABELS[job.status].toLowerCase()}; a closed job is not edited.`, 409);
      }
      await checkReferences(tx, input);
      const values = columnsOf(input);
      await tx.update(jobs).set(values).where(eq(jobs.id, job.id));
      await recordAudit(tx, { actorId: actor.id, action: "job.update", subjectType: "job", subjectId: job.id, details: { jobId: job.id, changed: changesOf(job, values) } });
    });
  } catch (error) {
    if (isDuplicateKey(error)) throw duplicateNumber(jobNumber);
    throw error;
  }
  return getJob(actor, jobId);
}

export async function changeJobStatus(actor: Actor, jobId: number, rawInput: unknown): Promise<JobDetail> {
  await db.transaction(async (tx) => {
    const job = await loadJobFor(actor, jobId, "job.update", tx);
    const { status } = parseInput(jobStatusInput, rawInput);
    const [locked] = await tx.select({ status: jobs.status }).from(jobs).where(eq(jobs.id, job.id)).for("update");
    if (!STATUS_TRANSITIONS[locked.status].includes(status)) {
      const allowed = STATUS_TRANSITIONS[locked.status].map((s) => STATUS_LABELS[s].toLowerCase());
      throw new AppError(
        "status_not_allowed",
        `Job ${job.jobNumber} is ${STATUS_LABELS[locked.status].toLowerCase()}; it can ${allowed.length ? `move to ${allowed.join(" or ")}` : "no longer change status"}, not to ${STATUS_LABELS[status].toLowerCase()}.`,
        409,
      );
    }
    await tx.update(jobs).set({ status }).where(eq(jobs.id, job.id));
    await recordAudit(tx, { actorId: actor.id, action: "job.status_change", subjectType: "job", subjectId: job.id, details: { jobId: job.id, from: locked.status, to: status } });
  });
  return getJob(actor, jobId);
}
