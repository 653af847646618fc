// The authorization matrix of the route handlers: every handler under app/ (the pages' own /api routes and
// /api/v1) called as anonymous, as each role (by token and by session cookie), as a disabled user, with a revoked
// and an expired token, and as a customer user of another customer; each answer is checked against the policy
// table of DEVELOPERS.md ("Who may do what"), which must equal lib/auth/policy.ts. Another customer's job is a 404
// and its data never appears. A route handler missing from ROUTES fails the guard test at the end.
import { readdirSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { SIGNATURE_MEANINGS } from "@/db/schema";
import { POLICY, type Action, type Role } from "@/lib/auth/policy";
import { answerMatches, expectedAnswer, TABLE, type Caller } from "./policy-table";
import { call, emptyMultipart, makePlant, sessionCookie, type Call, type Handler, type Plant, type PlantJob } from "./support";

const HTTP_METHODS = ["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"] as const;

interface RouteCase {
  /** The route file, from the repository root. */
  file: string;
  method: (typeof HTTP_METHODS)[number];
  action: Action;
  scope: "job" | "plant" | "list";
  request: (job: PlantJob, plant: Plant) => Partial<Call>;
}

const json = (body: unknown): Partial<Call> => ({ body: JSON.stringify(body), headers: { "content-type": "application/json" } });
const unique = () => Math.random().toString(36).slice(2, 10);
const validJob = (job: PlantJob) => ({ jobNumber: job.jobNumber, customerId: job.customerId, title: "Herbal tea 20 bags, folding carton", upsRows: 2, upsColumns: 3 });
const decision = { decision: "accepted", reason: "no_defect", version: 0 };
const signature = { verdict: "passed", meaning: SIGNATURE_MEANINGS[0], password: "not-the-password" };

const jobParams = (j: PlantJob) => ({ jobId: String(j.jobId) });
const inspectionParams = (j: PlantJob) => ({ inspectionId: String(j.inspectionId) });
const findingParams = (j: PlantJob) => ({ inspectionId: String(j.inspectionId), findingId: String(j.findingId) });

const ROUTES: RouteCase[] = [
  // The pages' own routes (app/api, cookie or token).
  { file: "app/api/artworks/[revisionId]/approve/route.ts", method: "POST", action: "artwork.approve", scope: "job", request: (j) => ({ params: { revisionId: String(j.draftRevisionId) } }) },
  { file: "app/api/artworks/[revisionId]/excluded-areas/route.ts", method: "PUT", action: "artwork.upload", scope: "job", request: (j) => ({ params: { revisionId: String(j.draftRevisionId) }, ...json({ areas: [] }) }) },
  { file: "app/api/artworks/[revisionId]/preview/route.ts", method: "GET", action: "job.read", scope: "job", request: (j) => ({ params: { revisionId: String(j.approvedRevisionId) } }) },
  { file: "app/api/attention/route.ts", method: "GET", action: "job.read", scope: "list", request: () => ({}) },
  { file: "app/api/audit/route.ts", method: "GET", action: "audit.read", scope: "plant", request: () => ({}) },
  { file: "app/api/customers/route.ts", method: "GET", action: "customer.manage", scope: "plant", request: () => ({}) },
  { file: "app/api/inspections/[inspectionId]/findings/[findingId]/crops/[kind]/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: { ...findingParams(j), kind: "scan" } }) },
  { file: "app/api/inspections/[inspectionId]/findings/[findingId]/decision/route.ts", method: "POST", action: "finding.decide", scope: "job", request: (j) => ({ params: findingParams(j), ...json(decision) }) },
  { file: "app/api/inspections/[inspectionId]/findings/[findingId]/decision/route.ts", method: "DELETE", action: "finding.decide", scope: "job", request: (j) => ({ params: findingParams(j), ...json({ version: 1 }) }) },
  { file: "app/api/inspections/[inspectionId]/findings/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: inspectionParams(j) }) },
  { file: "app/api/inspections/[inspectionId]/reopen/route.ts", method: "POST", action: "sheet.reopen", scope: "job", request: (j) => ({ params: inspectionParams(j), ...json({ reason: "Matrix test" }) }) },
  { file: "app/api/inspections/[inspectionId]/retry/route.ts", method: "POST", action: "inspection.retry", scope: "job", request: (j) => ({ params: { inspectionId: String(j.failedInspectionId) } }) },
  { file: "app/api/inspections/[inspectionId]/sheet/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: inspectionParams(j) }) },
  { file: "app/api/inspections/[inspectionId]/signoff/route.ts", method: "POST", action: "sheet.signoff", scope: "job", request: (j) => ({ params: inspectionParams(j), ...json(signature) }) },
  { file: "app/api/inspections/[inspectionId]/tiles/[...path]/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: { ...inspectionParams(j), path: ["artwork.dzi"] as never } }) },
  { file: "app/api/jobs/[jobId]/artworks/route.ts", method: "POST", action: "artwork.upload", scope: "job", request: (j) => ({ params: jobParams(j), ...emptyMultipart() }) },
  { file: "app/api/jobs/[jobId]/audit/route.ts", method: "GET", action: "job.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/jobs/[jobId]/pipeline/route.ts", method: "GET", action: "job.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/jobs/[jobId]/route.ts", method: "GET", action: "job.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/jobs/[jobId]/scans/route.ts", method: "POST", action: "scan.upload", scope: "job", request: (j) => ({ params: jobParams(j), ...emptyMultipart() }) },
  { file: "app/api/jobs/[jobId]/status/route.ts", method: "POST", action: "job.update", scope: "job", request: (j) => ({ params: jobParams(j), ...json({ status: "on_press" }) }) },
  { file: "app/api/jobs/route.ts", method: "GET", action: "job.read", scope: "list", request: () => ({}) },
  // The public API (/api/v1).
  { file: "app/api/v1/artwork-revisions/[revisionId]/approve/route.ts", method: "POST", action: "artwork.approve", scope: "job", request: (j) => ({ params: { revisionId: String(j.draftRevisionId) } }) },
  { file: "app/api/v1/customers/[customerId]/route.ts", method: "PATCH", action: "customer.manage", scope: "plant", request: (j) => ({ params: { customerId: String(j.customerId) }, ...json({ name: j.customerName, contactEmails: [] }) }) },
  { file: "app/api/v1/customers/route.ts", method: "POST", action: "customer.manage", scope: "plant", request: () => json({ name: `Matrix Mints ${unique()}`, contactEmails: [] }) },
  { file: "app/api/v1/inspections/[inspectionId]/findings/[findingId]/decision/route.ts", method: "POST", action: "finding.decide", scope: "job", request: (j) => ({ params: findingParams(j), ...json(decision) }) },
  { file: "app/api/v1/inspections/[inspectionId]/findings/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: inspectionParams(j) }) },
  { file: "app/api/v1/inspections/[inspectionId]/retry/route.ts", method: "POST", action: "inspection.retry", scope: "job", request: (j) => ({ params: { inspectionId: String(j.failedInspectionId) } }) },
  { file: "app/api/v1/inspections/[inspectionId]/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: inspectionParams(j) }) },
  { file: "app/api/v1/inspections/[inspectionId]/signoff/route.ts", method: "POST", action: "sheet.signoff", scope: "job", request: (j) => ({ params: inspectionParams(j), ...json(signature) }) },
  { file: "app/api/v1/jobs/[jobId]/artwork-revisions/route.ts", method: "POST", action: "artwork.upload", scope: "job", request: (j) => ({ params: jobParams(j), ...emptyMultipart() }) },
  { file: "app/api/v1/jobs/[jobId]/route.ts", method: "GET", action: "job.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/v1/jobs/[jobId]/route.ts", method: "PATCH", action: "job.update", scope: "job", request: (j) => ({ params: jobParams(j), ...json(validJob(j)) }) },
  { file: "app/api/v1/jobs/[jobId]/scans/route.ts", method: "POST", action: "scan.upload", scope: "job", request: (j) => ({ params: jobParams(j), ...emptyMultipart() }) },
  { file: "app/api/v1/jobs/route.ts", method: "GET", action: "job.read", scope: "list", request: () => ({}) },
  { file: "app/api/v1/jobs/route.ts", method: "POST", action: "job.create", scope: "plant", request: (j) => json({ ...validJob(j), jobNumber: `MX-${unique()}` }) },
  // --- Press run routes (issue 13: traceability, CSV, reports): read like the sheets they are made of ---
  { file: "app/api/v1/jobs/[jobId]/run/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/v1/jobs/[jobId]/run/sheets.csv/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/v1/jobs/[jobId]/run/report.pdf/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: jobParams(j) }) },
  { file: "app/api/v1/inspections/[inspectionId]/report.pdf/route.ts", method: "GET", action: "inspection.read", scope: "job", request: (j) => ({ params: inspectionParams(j) }) },
  // --- end of press run routes ---
];

/** Route handlers that answer everybody on purpose, with the reason. */
const PUBLIC_ROUTES: Record<string, string> = {
  "app/api/auth/[...nextauth]/route.ts GET": "next-auth's own endpoints (session, csrf, providers); they hold no job data",
  "app/api/auth/[...nextauth]/route.ts POST": "sign-in itself (rate-limited per account and address, tests/auth)",
  "app/api/v1/openapi.json/route.ts GET": "the API's description; it holds no data",
};

const ROOT = path.resolve(import.meta.dirname, "../..");
const routeModules = import.meta.glob<Record<string, unknown>>("../../app/**/route.ts");
const moduleOf = (file: string) => {
  const load = routeModules[`../../${file}`];
  if (!load) throw new Error(`${file} is not a route file`);
  return load();
};

/** The URL path a route file serves, with the case's params filled in. */
function urlPath(file: string, params: Record<string, string | string[]>): string {
  const route = file.replace(/^app/, "").replace(/\/route\.ts$/, "");
  return route.replace(/\[(?:\.\.\.)?(\w+)\]/g, (_, name: string) => [params[name]].flat().join("/"));
}

interface HeaderCaller extends Caller {
  headers: () => Promise<Record<string, string>>;
}

let plant: Plant;
let callers: HeaderCaller[];

beforeAll(async () => {
  plant = await makePlant();
  const bearer = (token: string) => async () => ({ authorization: `Bearer ${token}` });
  const cookie = (actor: Plant["disabled"]) => async () => ({ cookie: await sessionCookie(actor), origin: "http://127.0.0.1:3000" });
  callers = [
    { name: "anonymous", role: null, customerId: null, headers: async () => ({}) },
    { name: "disabled user (session)", role: null, customerId: null, headers: cookie(plant.disabled) },
    { name: "disabled user (token)", role: null, customerId: null, headers: bearer(plant.disabledUserToken) },
    { name: "revoked token", role: null, customerId: null, headers: bearer(plant.revokedToken) },
    { name: "expired token", role: null, customerId: null, headers: bearer(plant.expiredToken) },
    { name: "customer of another customer (token)", role: "customer", customerId: plant.b.customerId, headers: bearer(plant.otherCustomerToken) },
    { name: "customer of another customer (session)", role: "customer", customerId: plant.b.customerId, headers: cookie(plant.otherCustomer) },
  ];
  for (const role of Object.keys(plant.actors) as Role[]) {
    const actor = plant.actors[role];
    callers.push({ name: `${role} (token)`, role, customerId: actor.customerId, headers: bearer(plant.tokens[role]) });
    callers.push({ name: `${role} (session)`, role, customerId: actor.customerId, headers: cookie(actor) });
  }
});
afterAll(closeDb);

async function send(route: RouteCase, caller: HeaderCaller): Promise<{ status: number; text: string; code?: string }> {
  const handler = (await moduleOf(route.file))[route.method] as Handler;
  const c = route.request(plant.a, plant);
  const response = await call(handler, { ...c, method: route.method, path: urlPath(route.file, c.params ?? {}), headers: { ...(c.headers ?? {}), ...(await caller.headers()) } });
  const text = await response.text();
  let code: string | undefined;
  try {
    code = (JSON.parse(text) as { error?: { code?: string } }).error?.code;
  } catch {
    code = undefined; // an image or a DZI file: no error
  }
  return { status: response.status, text, code };
}

describe("authorization matrix: route handlers", () => {
  it("the table in DEVELOPERS.md is exactly lib/auth/policy.ts's POLICY", () => {
    expect(TABLE).toEqual(POLICY);
  });

  it("answers every route for every caller as the table says, and a refusal carries nothing of the job", async () => {
    const mismatches: string[] = [];
    for (const route of ROUTES) {
      for (const caller of callers) {
        const want = expectedAnswer(caller, route.action, route.scope, plant.a.customerId);
        const { status, text, code } = await send(route, caller);
        const label = `${route.method} ${route.file} as ${caller.name}`;
        if (!answerMatches(want, status, code)) mismatches.push(`${label}: expected ${want}, got ${status} ${text.slice(0, 120)}`);
        if (want !== "allowed") {
          for (const secret of [plant.a.customerName, plant.a.jobNumber]) expect(text, label).not.toContain(secret);
        }
        // A list answers a customer user with their own customer's jobs only.
        if (route.scope === "list" && caller.customerId === plant.b.customerId) expect(text, label).not.toContain(plant.a.jobNumber);
      }
    }
    expect(mismatches).toEqual([]);
  });

  it("lists only the caller's own customer's jobs; anonymous and refused tokens get 401", async () => {
    const listJobs = (await moduleOf("app/api/v1/jobs/route.ts")).GET as Handler;
    for (const caller of callers) {
      const response = await call(listJobs, { path: "/api/v1/jobs?limit=100", headers: await caller.headers() });
      if (caller.role === null) {
        expect(response.status, caller.name).toBe(401);
        continue;
      }
      expect(response.status, caller.name).toBe(200);
      const ids: number[] = [];
      let body = (await response.json()) as { items: { id: number; customerId: number }[]; nextCursor: string | null };
      ids.push(...body.items.map((i) => i.id));
      while (body.nextCursor) {
        const next = await call(listJobs, { path: `/api/v1/jobs?limit=100&cursor=${body.nextCursor}`, headers: await caller.headers() });
        body = await next.json();
        ids.push(...body.items.map((i) => i.id));
      }
      if (caller.role === "customer") {
        expect(body.items.every((i) => i.customerId === caller.customerId), caller.name).toBe(true);
        expect(ids.includes(plant.a.jobId), caller.name).toBe(caller.customerId === plant.a.customerId);
      } else {
        expect(ids, caller.name).toEqual(expect.arrayContaining([plant.a.jobId, plant.b.jobId]));
      }
    }
  });

  it("the policy answers before the body is read: a job change with an empty body is 403 or 404 for those without the right, 422 for the others", async () => {
    for (const file of ["app/api/v1/jobs/[jobId]/route.ts", "app/api/jobs/[jobId]/status/route.ts"]) {
      const route = ROUTES.find((r) => r.file === file && r.method !== "GET")!;
      for (const caller of callers) {
        const want = expectedAnswer(caller, route.action, route.scope, plant.a.customerId);
        const { status } = await send({ ...route, request: (j) => ({ ...route.request(j, plant), body: "{}" }) }, caller);
        expect(status, `${file} as ${caller.name}`).toBe(want === "allowed" ? 422 : want);
      }
    }
  });

  it("refuses a cookie-authenticated change sent from another site, but not the same change with a token", async () => {
    const retry = (await moduleOf("app/api/v1/inspections/[inspectionId]/retry/route.ts")).POST as Handler;
    const job = plant.b;
    const request: Call = { method: "POST", path: `/api/v1/inspections/${job.failedInspectionId}/retry`, params: { inspectionId: String(job.failedInspectionId) } };
    const cookie = await sessionCookie(plant.actors.qa);
    const fromElsewhere = await call(retry, { ...request, headers: { cookie, origin: "https://elsewhere.example" } });
    expect(fromElsewhere.status).toBe(403);
    expect((await fromElsewhere.json()).error.code).toBe("cross_origin");
    const crossSite = await call(retry, { ...request, headers: { cookie, "sec-fetch-site": "cross-site" } });
    expect(crossSite.status).toBe(403);
    const withToken = await call(retry, { ...request, headers: { authorization: `Bearer ${plant.tokens.qa}`, origin: "https://elsewhere.example" } });
    expect(withToken.status).toBe(200);
  });

  it("guard: every exported handler of every route.ts under app/ is in ROUTES or PUBLIC_ROUTES", async () => {
    const files: string[] = [];
    const walk = (dir: string) => {
      for (const entry of readdirSync(path.join(ROOT, dir), { withFileTypes: true })) {
        if (entry.isDirectory()) walk(`${dir}/${entry.name}`);
        else if (entry.name === "route.ts") files.push(`${dir}/${entry.name}`);
      }
    };
    walk("app");
    expect(files.length).toBeGreaterThan(30);
    const covered = new Set([...ROUTES.map((r) => `${r.file} ${r.method}`), ...Object.keys(PUBLIC_ROUTES)]);
    const missing: string[] = [];
    for (const file of files) {
      const exported = Object.keys(await moduleOf(file)).filter((name) => (HTTP_METHODS as readonly string[]).includes(name));
      for (const method of exported) if (!covered.has(`${file} ${method}`)) missing.push(`${method} ${file}`);
    }
    expect(missing, "route handlers missing from the authorization matrix").toEqual([]);
    // And nothing listed that no longer exists.
    const existing = new Set<string>();
    for (const file of files) for (const name of Object.keys(await moduleOf(file))) existing.add(`${file} ${name}`);
    expect([...covered].filter((key) => !existing.has(key))).toEqual([]);
  });
});
