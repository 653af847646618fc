// An invented press run for the run tests: a customer with a contact, a job of 400 sheets on a two-up sheet, an
// approved artwork revision, and one scan with a finished inspection per sheet number given (findings optional),
// plus one user per role with a password and a user of another customer. Unique names per call.
import { randomBytes, randomUUID } from "node:crypto";
import { db } from "@/db/client";
import { artworkRevisions, customers, findings, inspections, jobs, scans, toleranceProfiles, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import type { Actor, Role } from "@/lib/auth/policy";
import { eq } from "drizzle-orm";
import { ensureProfiles } from "../pipeline/support/fixtures";

export const PASSWORD = "run test password";
const sha = () => randomBytes(32).toString("hex");

export interface RunSheetFixture {
  sheetNumber: number;
  inspectionId: number;
  scanId: number;
  findingIds: number[];
}

export interface RunFixture {
  tag: string;
  jobId: number;
  jobNumber: string;
  customerId: number;
  revisionId: number;
  sheets: RunSheetFixture[];
  actors: Record<Role | "otherCustomer", Actor>;
}

export interface SheetSpec {
  sheetNumber: number;
  drift?: number;
  /** Boxes of findings, µm: [x, y, up]. */
  findings?: [number, number, number][];
  fileName?: string;
}

export async function makeRun(specs: SheetSpec[], runLengthSheets: number | null = 400): Promise<RunFixture> {
  await ensureProfiles();
  const tag = randomUUID().slice(0, 8);
  const [{ id: customerId }] = await db.insert(customers).values({ name: `Fernwhistle Preserves ${tag}`, contactEmails: [`qa-${tag}@fernwhistle.example`] }).$returningId();
  const [{ id: otherCustomerId }] = await db.insert(customers).values({ name: `Dunmarrow Oatcakes ${tag}` }).$returningId();
  const jobNumber = `RUN-${tag}`;
  const [{ id: jobId }] = await db
    .insert(jobs)
    .values({ customerId, jobNumber, title: "Damson jam 454 g, folding carton", upsRows: 1, upsColumns: 2, runLengthSheets })
    .$returningId();
  const [{ id: revisionId }] = await db
    .insert(artworkRevisions)
    .values({ jobId, revision: 1, sourceKey: `artwork-sources/${tag}.pdf`, sourceSha256: sha(), originalFilename: "damson-carton-r1.pdf", pageWidthUm: 200_000, pageHeightUm: 120_000, upsRows: 1, upsColumns: 2, status: "approved", approvedAt: new Date(), rasterStatus: "ready" })
    .$returningId();
  const [profile] = await db.select().from(toleranceProfiles).where(eq(toleranceProfiles.name, "standard-food"));
  const sheets: RunSheetFixture[] = [];
  for (const spec of specs) {
    const [{ id: scanId }] = await db
      .insert(scans)
      .values({ jobId, artworkRevisionId: revisionId, sheetNumber: spec.sheetNumber, objectKey: `scans/${randomUUID()}.png`, sha256: sha(), dpi: 150, byteSize: 1000, originalFilename: spec.fileName ?? `sheet-${spec.sheetNumber}.png`, contentType: "image/png" })
      .$returningId();
    const [{ id: inspectionId }] = await db
      .insert(inspections)
      .values({
        scanId,
        artworkRevisionId: revisionId,
        toleranceProfileId: profile.id,
        status: "done",
        stage: "done",
        progressPercent: 100,
        rotationDeg: 0.3,
        scale: 1.0004,
        txUm: 900,
        tyUm: -400,
        residualUm: 35,
        correlation: 0.991,
        coveredXUm: 0,
        coveredYUm: 0,
        coveredWUm: 200_000,
        coveredHUm: 118_000,
        driftDeltaE00: spec.drift ?? 1.1,
        finishedAt: new Date(),
      })
      .$returningId();
    const findingIds: number[] = [];
    for (const [x, y, up] of spec.findings ?? []) {
      const [{ id }] = await db
        .insert(findings)
        .values({ inspectionId, xUm: x, yUm: y, wUm: 1200, hUm: 900, areaUm2: 1200 * 900, deltaE00Mean: 5.5, deltaE00Max: 11.2, kind: "extra_ink", upIndex: up })
        .$returningId();
      findingIds.push(id);
    }
    sheets.push({ sheetNumber: spec.sheetNumber, inspectionId, scanId, findingIds });
  }
  const passwordHash = await hashPassword(PASSWORD);
  const actors = {} as RunFixture["actors"];
  const people: [keyof RunFixture["actors"], Role, number | null][] = [
    ["admin", "admin", null],
    ["prepress", "prepress", null],
    ["qa", "qa", null],
    ["reviewer", "reviewer", null],
    ["customer", "customer", customerId],
    ["otherCustomer", "customer", otherCustomerId],
  ];
  for (const [key, role, customer] of people) {
    const email = `${key.toLowerCase()}-${tag}@run.example`;
    const name = `${key[0].toUpperCase()}${key.slice(1)} ${tag}`;
    const [{ id }] = await db.insert(users).values({ email, name, role, customerId: customer, passwordHash }).$returningId();
    actors[key] = { id, role, customerId: customer, name, email };
  }
  return { tag, jobId, jobNumber, customerId, revisionId, sheets, actors };
}
