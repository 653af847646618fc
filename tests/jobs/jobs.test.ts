// Jobs' data access: create and edit with validation, a duplicate job number as a field error, status changes
// along the allowed transitions only, the server-side list, and customer users' read-only view of their own
// customer's jobs (another customer's job is "not found").
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { auditEvents, jobs, toleranceProfiles } from "../../db/schema";
import { AppError } from "../../lib/errors";
import { changeJobStatus, createJob, getJob, listJobs, updateJob } from "../../lib/jobs/jobs";
import { listJobAudit, listPlantAudit } from "../../lib/audit-trail";
import { ensureProfiles } from "../pipeline/support/fixtures";
import { createCustomer, createUser, unique } from "../db/fixtures";

afterAll(closeDb);

async function refusal(promise: Promise<unknown>): Promise<AppError> {
  const error = await promise.then(() => null, (e: unknown) => e);
  expect(error).toBeInstanceOf(AppError);
  return error as AppError;
}

let profileId: number;
beforeAll(async () => {
  await ensureProfiles();
  [{ id: profileId }] = await db.select({ id: toleranceProfiles.id }).from(toleranceProfiles).where(eq(toleranceProfiles.name, "standard-food"));
});

const form = (customerId: number, overrides: Record<string, unknown> = {}) => ({
  jobNumber: unique("WF"),
  customerId: String(customerId),
  title: "Oat flakes 750 g, carton",
  stock: "GC2 folding boxboard 350 g/m²",
  boardThicknessMm: "0,48",
  press: "Sheet-fed offset, 5 colours",
  runLengthSheets: "12000",
  upsRows: "2",
  upsColumns: "3",
  toleranceProfileId: String(profileId),
  ...overrides,
});

describe("jobs", () => {
  it("prepress creates a job from form strings; lengths are stored in µm and the creation is audited", async () => {
    const customer = await createCustomer();
    const prepress = await createUser({ role: "prepress" });
    const input = form(customer.id);
    const job = await createJob(prepress, input);
    expect(job).toMatchObject({ jobNumber: input.jobNumber, customerName: customer.name, boardThicknessMm: 0.48, runLengthSheets: 12000, upsRows: 2, upsColumns: 3, status: "prepress", toleranceProfileId: profileId });
    expect(job.toleranceProfileLabel).toBe("Food and general consumer packaging");
    const [row] = await db.select().from(jobs).where(eq(jobs.id, job.id));
    expect([row.boardThicknessUm, row.createdBy]).toEqual([480, prepress.id]);
    const [event] = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "job.create"), eq(auditEvents.subjectId, String(job.id))));
    expect(event.actorId).toBe(prepress.id);
  });

  it("a duplicate job number is a clear field error and nothing is stored", async () => {
    const customer = await createCustomer();
    const admin = await createUser({ role: "admin" });
    const first = await createJob(admin, form(customer.id));
    const error = await refusal(createJob(admin, form(customer.id, { jobNumber: first.jobNumber, title: "Another carton" })));
    expect([error.status, error.code]).toEqual([422, "invalid_input"]);
    expect(error.fieldErrors?.jobNumber).toEqual([`Job number ${first.jobNumber} is already used by another job.`]);
    expect(await db.select().from(jobs).where(eq(jobs.jobNumber, first.jobNumber))).toHaveLength(1);
  });

  it("names every bad field: empty title, a board far thicker than carton board, zero ups, an unknown customer", async () => {
    const admin = await createUser({ role: "admin" });
    const error = await refusal(createJob(admin, form(999_999_999, { title: " ", boardThicknessMm: "6", upsRows: "0", runLengthSheets: "many", jobNumber: "no spaces please" })));
    expect(error.status).toBe(422);
    const f = error.fieldErrors ?? {};
    expect(f.title).toEqual(["Title is required."]);
    // Folding carton board is usually up to about 0.6 mm (common practice, no published source).
    expect(f.boardThicknessMm?.[0]).toMatch(/at most 1.2 mm .*about 0.6 mm/);
    expect(f.upsRows).toEqual(["Rows of ups must be at least 1."]);
    expect(f.runLengthSheets).toEqual(["Run length must be a number."]);
    expect(f.jobNumber?.[0]).toMatch(/letters, digits/);
    // References are checked once the fields themselves are right.
    const unknown = await refusal(createJob(admin, form(999_999_999)));
    expect(unknown.fieldErrors).toEqual({ customerId: ["Choose a customer from the list."] });
  });

  it("edits a job and records what changed; a renumbering onto a used number is refused", async () => {
    const customer = await createCustomer();
    const prepress = await createUser({ role: "prepress" });
    const job = await createJob(prepress, form(customer.id));
    const other = await createJob(prepress, form(customer.id));
    const edited = await updateJob(prepress, job.id, form(customer.id, { jobNumber: job.jobNumber, runLengthSheets: "", boardThicknessMm: "0.5" }));
    expect([edited.runLengthSheets, edited.boardThicknessMm]).toEqual([null, 0.5]);
    const [event] = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "job.update"), eq(auditEvents.subjectId, String(job.id))));
    expect(event.details).toMatchObject({ changed: { runLengthSheets: { from: 12000, to: null }, boardThicknessUm: { from: 480, to: 500 } } });
    const clash = await refusal(updateJob(prepress, job.id, form(customer.id, { jobNumber: other.jobNumber })));
    expect(clash.fieldErrors?.jobNumber?.[0]).toContain("already used");
  });

  it("moves status along prepress → on press → completed only; a closed job is not edited", async () => {
    const customer = await createCustomer();
    const prepress = await createUser({ role: "prepress" });
    const job = await createJob(prepress, form(customer.id));
    expect(job.nextStatuses).toEqual(["on_press", "cancelled"]);
    const skip = await refusal(changeJobStatus(prepress, job.id, { status: "completed" }));
    expect([skip.status, skip.code]).toEqual([409, "status_not_allowed"]);
    expect(skip.message).toBe(`Job ${job.jobNumber} is in prepress; it can move to on press or cancelled, not to completed.`);
    expect((await changeJobStatus(prepress, job.id, { status: "on_press" })).status).toBe("on_press");
    const done = await changeJobStatus(prepress, job.id, { status: "completed" });
    expect([done.status, done.nextStatuses]).toEqual(["completed", []]);
    expect((await refusal(changeJobStatus(prepress, job.id, { status: "on_press" }))).status).toBe(409);
    expect((await refusal(updateJob(prepress, job.id, form(customer.id, { jobNumber: job.jobNumber })))).code).toBe("job_closed");
    const bad = await refusal(changeJobStatus(prepress, job.id, { status: "printed" }));
    expect(bad.status).toBe(422);
    const trail = await listJobAudit(prepress, job.id, { kind: "job.status_change" });
    expect(trail.rows.map((r) => r.details)).toEqual([
      { jobId: job.id, from: "on_press", to: "completed" },
      { jobId: job.id, from: "prepress", to: "on_press" },
    ]);
  });

  it("QA and reviewers read jobs but may not create, edit or move them (403)", async () => {
    const customer = await createCustomer();
    const job = await createJob(await createUser({ role: "admin" }), form(customer.id));
    for (const role of ["qa", "reviewer"] as const) {
      const actor = await createUser({ role });
      expect((await getJob(actor, job.id)).may.update).toBe(false);
      expect((await refusal(createJob(actor, form(customer.id)))).status).toBe(403);
      expect((await refusal(updateJob(actor, job.id, form(customer.id)))).status).toBe(403);
      expect((await refusal(changeJobStatus(actor, job.id, { status: "on_press" }))).status).toBe(403);
    }
  });

  it("a customer user reads their own customer's jobs read-only; another customer's job is 404, not 403", async () => {
    const [own, other] = [await createCustomer(), await createCustomer()];
    const admin = await createUser({ role: "admin" });
    const ownJob = await createJob(admin, form(own.id));
    const otherJob = await createJob(admin, form(other.id));
    const buyer = await createUser({ role: "customer", customerId: own.id });
    const seen = await getJob(buyer, ownJob.id);
    expect([seen.may.update, seen.nextStatuses]).toEqual([false, []]);
    expect((await refusal(updateJob(buyer, ownJob.id, form(own.id, { jobNumber: ownJob.jobNumber })))).status).toBe(403);
    const attempts = [
      () => getJob(buyer, otherJob.id),
      () => updateJob(buyer, otherJob.id, form(other.id)),
      () => changeJobStatus(buyer, otherJob.id, { status: "on_press" }),
      () => listJobAudit(buyer, otherJob.id, {}),
    ];
    for (const attempt of attempts) {
      const error = await refusal(attempt());
      expect([error.status, error.message]).toEqual([404, "The job was not found."]);
    }
    const list = await listJobs(buyer, { pageSize: 100 });
    expect(list.rows.every((r) => r.customerId === own.id)).toBe(true);
    expect(list.rows.map((r) => r.id)).toContain(ownJob.id);
    // Asking the list for another customer's jobs gives nothing, not their jobs.
    expect((await listJobs(buyer, { customerId: other.id })).total).toBe(0);
    expect((await refusal(listPlantAudit(buyer, {}))).status).toBe(403);
  });

  it("lists jobs filtered by text and status, sorted and paginated on the server", async () => {
    const customer = await createCustomer();
    const admin = await createUser({ role: "admin" });
    const tag = unique("LST");
    for (const n of ["3", "1", "2"]) await createJob(admin, form(customer.id, { jobNumber: `${tag}-${n}` }));
    const first = await listJobs(admin, { q: tag, sort: "jobNumber", dir: "asc", page: 1, pageSize: 5 });
    expect([first.total, first.rows.map((r) => r.jobNumber)]).toEqual([3, [`${tag}-1`, `${tag}-2`, `${tag}-3`]]);
    await changeJobStatus(admin, first.rows[0].id, { status: "on_press" });
    const onPress = await listJobs(admin, { q: tag, status: "on_press" });
    expect(onPress.rows.map((r) => r.jobNumber)).toEqual([`${tag}-1`]);
    const second = await listJobs(admin, { q: tag, sort: "jobNumber", dir: "desc", page: 2, pageSize: 5 });
    expect([second.total, second.rows]).toEqual([3, []]);
    const byCustomer = await listJobs(admin, { customerId: customer.id, pageSize: 100 });
    expect(byCustomer.total).toBe(3);
  });

  it("the plant's audit trail is for administrators, filterable by kind and person", async () => {
    const customer = await createCustomer();
    const [admin, prepress] = [await createUser({ role: "admin" }), await createUser({ role: "prepress" })];
    await createJob(prepress, form(customer.id));
    expect((await refusal(listPlantAudit(prepress, {}))).status).toBe(403);
    const mine = await listPlantAudit(admin, { personId: prepress.id, kind: "job" });
    expect(mine.rows.map((r) => [r.action, r.actorName])).toEqual([["job.create", prepress.name]]);
    expect(mine.people.some((p) => p.id === prepress.id)).toBe(true);
    expect(mine.kinds).toContain("job.create");
  });
});
