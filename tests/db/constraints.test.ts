// The database itself refuses duplicates the product must never hold, whatever the code above it does.
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { artworkRevisions, auditEvents, jobs, scans, toleranceProfiles, users } from "../../db/schema";
import { createCustomer, createJob, createUser, unique } from "./fixtures";

afterAll(closeDb);

const duplicate = (promise: Promise<unknown>) =>
  expect(promise).rejects.toMatchObject({ cause: expect.objectContaining({ code: "ER_DUP_ENTRY" }) });

describe("constraints", () => {
  it("refuse a second user with the same e-mail", async () => {
    const user = await createUser({ role: "qa" });
    await duplicate(db.insert(users).values({ email: user.email, name: "Someone else", role: "reviewer" }));
  });

  it("refuse a second job with the same job number", async () => {
    const customer = await createCustomer();
    const job = await createJob(customer.id);
    await duplicate(db.insert(jobs).values({ customerId: customer.id, jobNumber: job.jobNumber, title: "Copy" }));
  });

  it("refuse a second artwork revision with the same number on one job", async () => {
    const customer = await createCustomer();
    const job = await createJob(customer.id);
    const revision = { jobId: job.id, revision: 1, sourceKey: unique("artwork/"), sourceSha256: "a".repeat(64), pageWidthUm: 210_000, pageHeightUm: 297_000 };
    await db.insert(artworkRevisions).values(revision);
    await duplicate(db.insert(artworkRevisions).values({ ...revision, sourceKey: unique("artwork/") }));
  });

  it("recognise the same scan file uploaded twice to one job, but allow it on another job", async () => {
    const customer = await createCustomer();
    const [first, second] = [await createJob(customer.id), await createJob(customer.id)];
    const artworkOf = async (jobId: number) =>
      (
        await db
          .insert(artworkRevisions)
          .values({ jobId, revision: 1, sourceKey: unique("artwork/"), sourceSha256: "b".repeat(64), pageWidthUm: 1, pageHeightUm: 1 })
          .$returningId()
      )[0].id;
    const scan = (jobId: number, artworkRevisionId: number) => ({
      jobId,
      artworkRevisionId,
      objectKey: unique("scans/"),
      sha256: "c".repeat(64),
      dpi: 300,
      byteSize: 1234,
    });
    const firstArtwork = await artworkOf(first.id);
    await db.insert(scans).values(scan(first.id, firstArtwork));
    await duplicate(db.insert(scans).values(scan(first.id, firstArtwork)));
    await expect(db.insert(scans).values(scan(second.id, await artworkOf(second.id)))).resolves.toBeDefined();
  });

  it("refuse a job for a customer that does not exist (foreign key)", async () => {
    await expect(db.insert(jobs).values({ customerId: 987_654_321, jobNumber: unique("T"), title: "Orphan" })).rejects.toMatchObject({
      cause: expect.objectContaining({ code: "ER_NO_REFERENCED_ROW_2" }),
    });
  });

  it("give JSON columns back parsed and ids back from $returningId", async () => {
    const areas = [{ x: 5.5, y: 10, w: 20, h: 4 }];
    const [row] = await db
      .insert(toleranceProfiles)
      .values({ name: unique("profile"), label: "Test", minDefectUm: 250, deltaE00Threshold: 3.5, registrationToleranceUm: 100, excludedAreasMm: areas })
      .$returningId();
    expect(row.id).toBeTypeOf("number");
    const [read] = await db.select().from(toleranceProfiles).where(eq(toleranceProfiles.id, row.id));
    expect(read.excludedAreasMm).toEqual(areas);
    expect(read.deltaE00Threshold).toBe(3.5);
  });

  it("store timestamps in UTC", async () => {
    const before = Date.now();
    const [row] = await db.insert(auditEvents).values({ action: "test.clock", subjectType: "test", subjectId: "1" }).$returningId();
    const [read] = await db.select().from(auditEvents).where(eq(auditEvents.id, row.id));
    expect(Math.abs(read.at.getTime() - before)).toBeLessThan(60_000);
  });
});
