// A small invented plant for the API tests: two customers, each with a job that has an approved and a draft
// artwork revision, a scan with a finished inspection and a finding, and a failed inspection; one user per role,
// a customer user of each customer, a disabled user, and tokens (working, revoked, expired). Route handlers are
// called directly with plain Requests, authenticated the way a client would be (session cookie or bearer token).
import "../pipeline/support/test-env";
import { randomBytes, randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { encode } from "next-auth/jwt";
import { db } from "@/db/client";
import { apiTokens, artworkRevisions, customers, findings, inspections, jobs, scans, toleranceProfiles, users } from "@/db/schema";
import type { Actor, Role } from "@/lib/auth/policy";
import { createApiToken } from "@/lib/auth/tokens";
import { env } from "@/lib/env";
import { keys, sourceObjectId } from "@/storage/keys";
import { ensureBucket, putObject } from "@/storage/objects";
import { ensureProfiles } from "../pipeline/support/fixtures";

export const BASE = "http://127.0.0.1:3000";

export interface PlantJob {
  customerId: number;
  customerName: string;
  jobId: number;
  jobNumber: string;
  approvedRevisionId: number;
  draftRevisionId: number;
  inspectionId: number;
  failedInspectionId: number;
  findingId: number;
}

export interface Plant {
  a: PlantJob;
  b: PlantJob;
  actors: Record<Role, Actor>;
  otherCustomer: Actor;
  disabled: Actor;
  tokens: Record<Role, string>;
  otherCustomerToken: string;
  revokedToken: string;
  expiredToken: string;
  disabledUserToken: string;
}

const sha = () => randomBytes(32).toString("hex");

async function makeUser(role: Role, customerId: number | null, tag: string, disabled = false): Promise<Actor> {
  const email = `${role}-${tag}-${randomUUID().slice(0, 4)}@api.example`;
  const name = `${role} ${tag}`;
  const [{ id }] = await db.insert(users).values({ email, name, role, customerId, disabled }).$returningId();
  return { id, role, customerId, name, email };
}

async function makeJob(tag: string, customerName: string): Promise<PlantJob> {
  const name = `${customerName} ${tag}`;
  const [{ id: customerId }] = await db.insert(customers).values({ name }).$returningId();
  const jobNumber = `API-${tag}-${customerId}`;
  const [{ id: jobId }] = await db
    .insert(jobs)
    .values({ customerId, jobNumber, title: "Herbal tea 20 bags, folding carton", upsRows: 2, upsColumns: 3 })
    .$returningId();
  const revision = (n: number, status: "approved" | "draft") => ({
    jobId,
    revision: n,
    sourceKey: `artwork-sources/${randomUUID()}.pdf`,
    sourceSha256: sha(),
    originalFilename: `carton-r${n}.pdf`,
    byteSize: 1000,
    pageWidthUm: 420_000,
    pageHeightUm: 297_000,
    status,
    rasterStatus: status === "approved" ? ("ready" as const) : ("none" as const),
  });
  const approved = revision(1, "approved");
  const [{ id: approvedRevisionId }] = await db.insert(artworkRevisions).values(approved).$returningId();
  await putObject(keys.preview(sourceObjectId(approved.sourceKey)), PNG, "image/png");
  const tilesPrefix = `tiles/${randomUUID()}/`;
  await putObject(`${tilesPrefix}artwork.dzi`, Buffer.from('<?xml version="1.0"?><Image/>'), "application/xml");
  const [{ id: draftRevisionId }] = await db.insert(artworkRevisions).values(revision(2, "draft")).$returningId();
  const { inspectionId, findingId } = await addInspectedSheet({ jobId, approvedRevisionId }, 17, tilesPrefix);
  const [profile] = await db.select().from(toleranceProfiles).limit(1);
  const [{ id: failedScanId }] = await db.insert(scans).values(scanRow({ jobId, approvedRevisionId }, 18)).$returningId();
  const [{ id: failedInspectionId }] = await db
    .insert(inspections)
    .values({ scanId: failedScanId, artworkRevisionId: approvedRevisionId, toleranceProfileId: profile.id, status: "failed", errorCode: "unreadable_scan", errorMessage: "The scan could not be read." })
    .$returningId();
  return { customerId, customerName: name, jobId, jobNumber, approvedRevisionId, draftRevisionId, inspectionId, failedInspectionId, findingId };
}

const scanRow = (job: { jobId: number; approvedRevisionId: number }, n: number) => ({
  jobId: job.jobId,
  artworkRevisionId: job.approvedRevisionId,
  sheetNumber: n,
  objectKey: `scans/${randomUUID()}.png`,
  sha256: sha(),
  dpi: 150,
  byteSize: 2000,
  originalFilename: `sheet-${n}.png`,
  contentType: "image/png",
});

/** A scanned sheet of the job with a finished inspection and one undecided finding (an extra-ink spot in up 2). */
export async function addInspectedSheet(job: { jobId: number; approvedRevisionId: number }, sheetNumber: number, tilesPrefix: string | null = null) {
  const [profile] = await db.select().from(toleranceProfiles).limit(1);
  const [{ id: scanId }] = await db.insert(scans).values(scanRow(job, sheetNumber)).$returningId();
  const [{ id: inspectionId }] = await db
    .insert(inspections)
    .values({
      scanId,
      artworkRevisionId: job.approvedRevisionId,
      toleranceProfileId: profile.id,
      status: "done",
      stage: "done",
      progressPercent: 100,
      rotationDeg: 0.4,
      scale: 1.001,
      txUm: 1200,
      tyUm: -800,
      residualUm: 40,
      correlation: 0.97,
      coveredXUm: 0,
      coveredYUm: 0,
      coveredWUm: 420_000,
      coveredHUm: 297_000,
      driftDeltaE00: 1.2,
      startedAt: new Date(),
      finishedAt: new Date(),
      tilesStatus: tilesPrefix ? "ready" : "none",
      tilesPrefix,
    })
    .$returningId();
  const [{ id: findingId }] = await db
    .insert(findings)
    .values({
      inspectionId,
      xUm: 10_000,
      yUm: 20_000,
      wUm: 3000,
      hUm: 2000,
      areaUm2: 6_000_000,
      deltaE00Mean: 6.5,
      deltaE00Max: 11.2,
      kind: "extra_ink",
      upIndex: 2,
      cropScanKey: CROP_KEY,
      cropArtworkKey: CROP_KEY,
      cropDifferenceKey: CROP_KEY,
    })
    .$returningId();
  return { inspectionId, findingId };
}

/** One tiny PNG stands in for every crop image and preview. */
const CROP_KEY = `crops/${randomUUID()}.png`;
const PNG = Buffer.from("89504e470d0a1a0a", "hex");

export async function makePlant(): Promise<Plant> {
  await ensureProfiles();
  await ensureBucket();
  await putObject(CROP_KEY, PNG, "image/png");
  const tag = randomUUID().slice(0, 8);
  const a = await makeJob(tag, "Kettlewick Tea Company");
  const b = await makeJob(tag, "Brambleford Pharma");
  const actors = {} as Record<Role, Actor>;
  for (const role of ["admin", "prepress", "qa", "reviewer", "customer"] as Role[]) {
    actors[role] = await makeUser(role, role === "customer" ? a.customerId : null, tag);
  }
  const otherCustomer = await makeUser("customer", b.customerId, `${tag}-b`);
  const disabled = await makeUser("admin", null, `${tag}-disabled`, true);
  const tokens = {} as Record<Role, string>;
  for (const role of Object.keys(actors) as Role[]) tokens[role] = (await createApiToken(null, actors[role].id, "test")).token;
  const revoked = await createApiToken(null, actors.admin.id, "revoked");
  await db.update(apiTokens).set({ revokedAt: new Date() }).where(eq(apiTokens.id, revoked.id));
  const expired = await createApiToken(null, actors.admin.id, "expired", new Date(Date.now() + 60_000));
  await db.update(apiTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(apiTokens.id, expired.id));
  return {
    a,
    b,
    actors,
    otherCustomer,
    disabled,
    tokens,
    otherCustomerToken: (await createApiToken(null, otherCustomer.id, "test")).token,
    revokedToken: revoked.token,
    expiredToken: expired.token,
    disabledUserToken: (await createApiToken(null, disabled.id, "test")).token,
  };
}

/** The cookie next-auth would set after this actor signed in. */
export async function sessionCookie(actor: Actor): Promise<string> {
  const token = await encode({
    token: { sub: String(actor.id), uid: actor.id, role: actor.role, customerId: actor.customerId, name: actor.name, email: actor.email },
    secret: env.NEXTAUTH_SECRET,
  });
  return `next-auth.session-token=${token}`;
}

export type Handler = (request: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

export interface Call {
  method?: string;
  path: string;
  params?: Record<string, string>;
  headers?: Record<string, string>;
  body?: BodyInit;
}

export async function call(handler: Handler, c: Call): Promise<Response> {
  const request = new Request(`${BASE}${c.path}`, { method: c.method ?? "GET", headers: c.headers, body: c.body });
  return handler(request, { params: Promise.resolve(c.params ?? {}) });
}

export function emptyMultipart(fields: Record<string, string> = {}): { body: FormData } {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  return { body: form };
}
