// The dashboard's data access: a customer user sees their own customer's jobs and nothing of another customer's.
import { afterAll, describe, expect, it } from "vitest";
import { closeDb } from "../../db/client";
import { listJobsForActor } from "../../lib/jobs/queries";
import { createCustomer, createJob, createUser } from "../db/fixtures";

afterAll(closeDb);

describe("jobs the dashboard lists", () => {
  it("for a customer user: only their customer's jobs", async () => {
    const [tea, medicines] = [await createCustomer(), await createCustomer()];
    const teaJobs = [await createJob(tea.id), await createJob(tea.id)];
    const medicineJob = await createJob(medicines.id);
    const buyer = await createUser({ role: "customer", customerId: tea.id });
    const seen = await listJobsForActor(buyer);
    expect(seen.map((j) => j.id).sort()).toEqual(teaJobs.map((j) => j.id).sort());
    expect(seen.some((j) => j.id === medicineJob.id)).toBe(false);
    expect(seen.every((j) => j.customerId === tea.id)).toBe(true);
  });

  it("for a customer user without a customer: nothing", async () => {
    await createJob((await createCustomer()).id);
    expect(await listJobsForActor(await createUser({ role: "customer", customerId: null }))).toEqual([]);
  });

  it("for staff: every customer's jobs, with the customer's name", async () => {
    const [a, b] = [await createCustomer(), await createCustomer()];
    const jobs = [await createJob(a.id), await createJob(b.id)];
    const seen = await listJobsForActor(await createUser({ role: "reviewer" }));
    for (const job of jobs) expect(seen.find((j) => j.id === job.id)).toMatchObject({ jobNumber: job.jobNumber, scanCount: 0 });
    expect(seen.find((j) => j.id === jobs[1].id)?.customerName).toBe(b.name);
  });
});
