// An invented inspected sheet for the review tests: a customer with contacts, a job, an approved artwork
// revision, a scan, a finished inspection and a few findings, plus one user per role with a password (sign-off
// asks for it). Unique names so test files and reruns never collide in the shared test database.
import { randomUUID } from "node:crypto";
import { db } from "@/db/client";
import { artworkRevisions, customers, findings, inspections, jobs, scans, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import type { Actor, Role } from "@/lib/auth/policy";
import { ensureProfiles } from "../pipeline/support/fixtures";
import { toleranceProfiles } from "@/db/schema";

export const PASSWORD = "review test password";
const fakeSha = (s: string) => (s.repeat(64) + "0".repeat(64)).slice(0, 64);

export interface Sheet {
  tag: string;
  jobId: number;
  customerId: number;
  inspectionId: number;
  findingIds: number[];
  contacts: string[];
  actors: Record<Role | "reviewer2" | "otherCustomer", Actor>;
}

export async function makeSheet(findingCount = 3): Promise<Sheet> {
  await ensureProfiles();
  const tag = randomUUID().slice(0, 8);
  const contacts = [`buyer-${tag}@brackenhollow.example`, `quality-${tag}@brackenhollow.example`];
  const [{ id: customerId }] = await db.insert(customers).values({ name: `Brackenhollow Honey ${tag}`, contactEmails: contacts }).$returningId();
  const [{ id: otherCustomerId }] = await db.insert(customers).values({ name: `Ostmere Biscuits ${tag}` }).$returningId();
  const [{ id: jobId }] = await db
    .insert(jobs)
    .values({ customerId, jobNumber: `R-${tag}`, title: "Wildflower honey 340 g, carton", upsRows: 1, upsColumns: 2 })
    .$returningId();
  const [{ id: revisionId }] = await db
    .insert(artworkRevisions)
    .values({ jobId, revision: 1, sourceKey: `artwork-sources/${tag}.pdf`, sourceSha256: fakeSha("a"), pageWidthUm: 200_000, pageHeightUm: 120_000, upsRows: 1, upsColumns: 2, status: "approved", approvedAt: new Date() })
    .$returningId();
  const [{ id: scanId }] = await db
    .insert(scans)
    .values({ jobId, artworkRevisionId: revisionId, sheetNumber: 1042, objectKey: `scans/${tag}.png`, sha256: fakeSha("b"), dpi: 150, byteSize: 1000, originalFilename: "sheet-1042.png" })
    .$returningId();
  const [profile] = await db.select({ id: toleranceProfiles.id }).from(toleranceProfiles).limit(1);
  const [{ id: inspectionId }] = await db
    .insert(inspections)
    .values({
      scanId,
      artworkRevisionId: revisionId,
      toleranceProfileId: profile.id,
      status: "done",
      progressPercent: 100,
      rotationDeg: 0.4,
      scale: 1.001,
      txUm: 1200,
      tyUm: -800,
      residualUm: 40,
      correlation: 0.993,
      coveredXUm: 0,
      coveredYUm: 0,
      coveredWUm: 200_000,
      coveredHUm: 90_000,
      finishedAt: new Date(),
    })
    .$returningId();
  const findingIds: number[] = [];
  for (let i = 0; i < findingCount; i++) {
    const [{ id }] = await db
      .insert(findings)
      .values({ inspectionId, xUm: 20_000 + i * 50_000, yUm: 30_000, wUm: 2000 + i * 500, hUm: 1500, areaUm2: (2000 + i * 500) * 1500, deltaE00Mean: 4.2 + i, deltaE00Max: 9.1 + i, kind: i === 0 ? "extra_ink" : "colour_shift", upIndex: i < 2 ? 1 : 2 })
      .$returningId();
    findingIds.push(id);
  }
  const passwordHash = await hashPassword(PASSWORD);
  const actors = {} as Sheet["actors"];
  const people: [keyof Sheet["actors"], Role, number | null][] = [
    ["admin", "admin", null],
    ["prepress", "prepress", null],
    ["qa", "qa", null],
    ["reviewer", "reviewer", null],
    ["reviewer2", "reviewer", null],
    ["customer", "customer", customerId],
    ["otherCustomer", "customer", otherCustomerId],
  ];
  for (const [key, role, customer] of people) {
    const email = `${key.toLowerCase()}-${tag}@review.example`;
    const name = `${key[0].toUpperCase()}${key.slice(1)} ${tag}`;
    const [{ id }] = await db.insert(users).values({ email, name, role, customerId: customer, passwordHash }).$returningId();
    actors[key] = { id, role, customerId: customer, name, email };
  }
  return { tag, jobId, customerId, inspectionId, findingIds, contacts, actors };
}
