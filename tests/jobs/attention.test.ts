// "What needs me now" by role: prepress gets draft artwork and failed rasters, QA failed inspections, reviewers
// sheets waiting for review oldest first, customer users their own sheets signed lately, administrators all.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { artworkRevisions, inspections, scans, toleranceProfiles } from "../../db/schema";
import { whatNeedsMe, type AttentionSection } from "../../lib/jobs/attention";
import { ensureProfiles } from "../pipeline/support/fixtures";
import { createCustomer, createJob, createUser, unique } from "../db/fixtures";

afterAll(closeDb);

let profileId: number;
beforeAll(async () => {
  await ensureProfiles();
  [{ id: profileId }] = await db.select({ id: toleranceProfiles.id }).from(toleranceProfiles).limit(1);
});

async function revision(jobId: number, n: number, values: Partial<typeof artworkRevisions.$inferInsert> = {}) {
  const [{ id }] = await db
    .insert(artworkRevisions)
    .values({ jobId, revision: n, sourceKey: `artwork-sources/${unique("k")}.pdf`, sourceSha256: unique("s").padEnd(64, "0"), originalFilename: `r${n}.pdf`, pageWidthUm: 0, pageHeightUm: 0, ...values })
    .$returningId();
  return id;
}

async function sheet(jobId: number, revisionId: number, sheetNumber: number, values: Partial<typeof inspections.$inferInsert>) {
  const [{ id: scanId }] = await db
    .insert(scans)
    .values({ jobId, artworkRevisionId: revisionId, sheetNumber, objectKey: `scans/${unique("k")}.png`, sha256: unique("h").padEnd(64, "0"), dpi: 150, byteSize: 1 })
    .$returningId();
  const [{ id }] = await db.insert(inspections).values({ scanId, artworkRevisionId: revisionId, toleranceProfileId: profileId, ...values }).$returningId();
  return id;
}

const section = (sections: AttentionSection[], kind: AttentionSection["kind"]) => sections.find((s) => s.kind === kind);

describe("what needs me now", () => {
  it("shows each role its own work, customers only their own customer's", async () => {
    const [own, other] = [await createCustomer(), await createCustomer()];
    const job = await createJob(own.id);
    const otherJob = await createJob(other.id);
    const draft = await revision(job.id, 1);
    const approved = await revision(job.id, 2, { status: "approved", rasterStatus: "failed", rasterError: "The artwork PDF is damaged." });
    const otherRevision = await revision(otherJob.id, 1, { status: "approved", rasterStatus: "ready" });
    const hourAgo = new Date(Date.now() - 3600_000);
    const later = await sheet(job.id, approved, 12, { status: "done", finishedAt: new Date() });
    const older = await sheet(job.id, approved, 11, { status: "done", finishedAt: hourAgo });
    const failed = await sheet(job.id, approved, 13, { status: "failed", errorMessage: "The scan cannot be read.", finishedAt: new Date() });
    const signedOwn = await sheet(job.id, approved, 14, { status: "done", verdict: "passed", signedAt: new Date() });
    const signedOther = await sheet(otherJob.id, otherRevision, 1, { status: "done", verdict: "failed", signedAt: new Date() });

    const prepress = await whatNeedsMe(await createUser({ role: "prepress" }));
    expect(prepress.map((s) => s.kind)).toEqual(["artwork_to_approve", "raster_failed"]);
    expect(section(prepress, "artwork_to_approve")!.total).toBeGreaterThanOrEqual(1);
    // Other test files leave drafts too; this one is among them unless the list is full.
    const drafts = section(prepress, "artwork_to_approve")!;
    if (drafts.total <= drafts.items.length) expect(drafts.items.some((i) => i.id === draft)).toBe(true);

    const reviewer = await whatNeedsMe(await createUser({ role: "reviewer" }));
    expect(reviewer.map((s) => s.kind)).toEqual(["sheet_to_review"]);
    const mine = section(reviewer, "sheet_to_review")!.items.filter((i) => i.jobId === job.id).map((i) => i.id);
    if (mine.length === 2) expect(mine).toEqual([older, later]);

    const qa = await whatNeedsMe(await createUser({ role: "qa" }));
    expect(qa.map((s) => s.kind)).toEqual(["inspection_failed", "sheet_failed"]);
    expect(section(qa, "inspection_failed")!.total).toBeGreaterThanOrEqual(1);

    const buyer = await whatNeedsMe(await createUser({ role: "customer", customerId: own.id }));
    expect(buyer.map((s) => s.kind)).toEqual(["sheet_signed"]);
    expect(buyer[0].items.map((i) => i.id)).toEqual([signedOwn]);
    expect(buyer[0].items[0]).toMatchObject({ subject: "Sheet 14", detail: "Passed", jobNumber: job.jobNumber });
    expect(JSON.stringify(buyer)).not.toContain(otherJob.jobNumber);

    const admin = await whatNeedsMe(await createUser({ role: "admin" }));
    expect(admin.map((s) => s.kind)).toEqual(["artwork_to_approve", "raster_failed", "inspection_failed", "sheet_to_review", "sheet_failed", "sheet_signed"]);
    expect(await whatNeedsMe(await createUser({ role: "customer", customerId: null }))).toEqual([]);
    const signed = section(admin, "sheet_signed")!;
    if (signed.total <= signed.items.length) expect(signed.items.map((i) => i.id)).toEqual(expect.arrayContaining([signedOwn, signedOther]));
    // A retried scan's newest inspection is the one that stands.
    const [scanOfFailed] = await db.select({ scanId: inspections.scanId }).from(inspections).where(eq(inspections.id, failed));
    await db.insert(inspections).values({ scanId: scanOfFailed.scanId, artworkRevisionId: approved, toleranceProfileId: profileId, status: "queued" });
    const qaAfter = await whatNeedsMe(await createUser({ role: "qa" }));
    expect(section(qaAfter, "inspection_failed")!.items.some((i) => i.id === failed)).toBe(false);
  });
});
