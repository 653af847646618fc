// The authorization matrix: every route handler (/api/v1 and the pages' own routes) called as anonymous, as each
// role (by token and by session cookie), as a disabled user, with a revoked and an expired token, and as a
// customer user of another customer; each answer is checked against POLICY_TABLE below, which is the table in
// DEVELOPERS.md ("Who may do what"). Another customer's job is a 404 and its data never appears.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { ACTIONS, can, type Action, type Role } from "@/lib/auth/policy";
import { call, emptyMultipart, makePlant, sessionCookie, type Call, type Handler, type Plant, type PlantJob } from "./support";

const { GET: listJobs } = await import("@/app/api/v1/jobs/route");
const { GET: getJob } = await import("@/app/api/v1/jobs/[jobId]/route");
const { POST: v1UploadArtwork } = await import("@/app/api/v1/jobs/[jobId]/artwork-revisions/route");
const { POST: v1Approve } = await import("@/app/api/v1/artwork-revisions/[revisionId]/approve/route");
const { POST: v1UploadScans } = await import("@/app/api/v1/jobs/[jobId]/scans/route");
const { GET: v1Inspection } = await import("@/app/api/v1/inspections/[inspectionId]/route");
const { GET: v1Findings } = await import("@/app/api/v1/inspections/[inspectionId]/findings/route");
const { POST: v1Retry } = await import("@/app/api/v1/inspections/[inspectionId]/retry/route");
const { GET: pipeline } = await import("@/app/api/jobs/[jobId]/pipeline/route");
const { POST: uploadArtwork } = await import("@/app/api/jobs/[jobId]/artworks/route");
const { POST: uploadScans } = await import("@/app/api/jobs/[jobId]/scans/route");
const { POST: approve } = await import("@/app/api/artworks/[revisionId]/approve/route");
const { GET: findings } = await import("@/app/api/inspections/[inspectionId]/findings/route");
const { POST: retry } = await import("@/app/api/inspections/[inspectionId]/retry/route");
const { GET: crop } = await import("@/app/api/inspections/[inspectionId]/findings/[findingId]/crops/[kind]/route");
// --- Press run routes (issue 13: traceability, CSV, reports) ---
const { GET: v1Run } = await import("@/app/api/v1/jobs/[jobId]/run/route");
const { GET: v1RunCsv } = await import("@/app/api/v1/jobs/[jobId]/run/sheets.csv/route");
const { GET: v1RunReport } = await import("@/app/api/v1/jobs/[jobId]/run/report.pdf/route");
const { GET: v1SheetReport } = await import("@/app/api/v1/inspections/[inspectionId]/report.pdf/route");
// --- end of press run routes ---

/** Role × action, as in DEVELOPERS.md. Customer users: their own customer's jobs only. */
const POLICY_TABLE: Record<Action, readonly Role[]> = {
  "job.read": ["admin", "prepress", "qa", "reviewer", "customer"],
  "job.create": ["admin", "prepress"],
  "job.update": ["admin", "prepress"],
  "customer.manage": ["admin", "prepress"],
  "artwork.upload": ["admin", "prepress"],
  "artwork.approve": ["admin", "prepress"],
  "scan.upload": ["admin", "qa"],
  "inspection.read": ["admin", "prepress", "qa", "reviewer", "customer"],
  "inspection.retry": ["admin", "qa"],
  "finding.decide": ["admin", "reviewer"],
  "sheet.signoff": ["admin", "reviewer"],
  "sheet.reopen": ["admin"],
  "user.manage": ["admin"],
  "settings.manage": ["admin"],
  "audit.read": ["admin"],
  // Self-service: only one's own tokens (tests/auth/tokens.test.ts checks the ownership).
  "api_token.manage": ["admin", "prepress", "qa", "reviewer", "customer"],
};

interface RouteCase {
  name: string;
  handler: Handler;
  action: Action;
  request: (job: PlantJob) => Call;
}

const post = (path: string, params: Record<string, string>, extra: Partial<Call> = {}): Call => ({ method: "POST", path, params, ...extra });

const ROUTES: RouteCase[] = [
  { name: "GET /api/v1/jobs/{id}", handler: getJob as Handler, action: "job.read", request: (j) => ({ path: `/api/v1/jobs/${j.jobId}`, params: { jobId: String(j.jobId) } }) },
  {
    name: "POST /api/v1/jobs/{id}/artwork-revisions",
    handler: v1UploadArtwork as Handler,
    action: "artwork.upload",
    request: (j) => post(`/api/v1/jobs/${j.jobId}/artwork-revisions`, { jobId: String(j.jobId) }, emptyMultipart()),
  },
  {
    name: "POST /api/v1/artwork-revisions/{id}/approve",
    handler: v1Approve as Handler,
    action: "artwork.approve",
    request: (j) => post(`/api/v1/artwork-revisions/${j.draftRevisionId}/approve`, { revisionId: String(j.draftRevisionId) }),
  },
  {
    name: "POST /api/v1/jobs/{id}/scans",
    handler: v1UploadScans as Handler,
    action: "scan.upload",
    request: (j) => post(`/api/v1/jobs/${j.jobId}/scans`, { jobId: String(j.jobId) }, emptyMultipart()),
  },
  {
    name: "GET /api/v1/inspections/{id}",
    handler: v1Inspection as Handler,
    action: "inspection.read",
    request: (j) => ({ path: `/api/v1/inspections/${j.inspectionId}`, params: { inspectionId: String(j.inspectionId) } }),
  },
  {
    name: "GET /api/v1/inspections/{id}/findings",
    handler: v1Findings as Handler,
    action: "inspection.read",
    request: (j) => ({ path: `/api/v1/inspections/${j.inspectionId}/findings`, params: { inspectionId: String(j.inspectionId) } }),
  },
  {
    name: "POST /api/v1/inspections/{id}/retry",
    handler: v1Retry as Handler,
    action: "inspection.retry",
    request: (j) => post(`/api/v1/inspections/${j.failedInspectionId}/retry`, { inspectionId: String(j.failedInspectionId) }),
  },
  { name: "GET /api/jobs/{id}/pipeline", handler: pipeline as Handler, action: "job.read", request: (j) => ({ path: `/api/jobs/${j.jobId}/pipeline`, params: { jobId: String(j.jobId) } }) },
  {
    name: "POST /api/jobs/{id}/artworks",
    handler: uploadArtwork as Handler,
    action: "artwork.upload",
    request: (j) => post(`/api/jobs/${j.jobId}/artworks`, { jobId: String(j.jobId) }, emptyMultipart()),
  },
  {
    name: "POST /api/jobs/{id}/scans",
    handler: uploadScans as Handler,
    action: "scan.upload",
    request: (j) => post(`/api/jobs/${j.jobId}/scans`, { jobId: String(j.jobId) }, emptyMultipart()),
  },
  {
    name: "POST /api/artworks/{id}/approve",
    handler: approve as Handler,
    action: "artwork.approve",
    request: (j) => post(`/api/artworks/${j.draftRevisionId}/approve`, { revisionId: String(j.draftRevisionId) }),
  },
  {
    name: "GET /api/inspections/{id}/findings",
    handler: findings as Handler,
    action: "inspection.read",
    request: (j) => ({ path: `/api/inspections/${j.inspectionId}/findings`, params: { inspectionId: String(j.inspectionId) } }),
  },
  {
    name: "POST /api/inspections/{id}/retry",
    handler: retry as Handler,
    action: "inspection.retry",
    request: (j) => post(`/api/inspections/${j.failedInspectionId}/retry`, { inspectionId: String(j.failedInspectionId) }),
  },
  {
    name: "GET /api/inspections/{id}/findings/{id}/crops/scan",
    handler: crop as Handler,
    action: "inspection.read",
    request: (j) => ({
      path: `/api/inspections/${j.inspectionId}/findings/${j.findingId}/crops/scan`,
      params: { inspectionId: String(j.inspectionId), findingId: String(j.findingId), kind: "scan" },
    }),
  },
  // --- Press run routes (issue 13): read like the sheets they are made of ---
  { name: "GET /api/v1/jobs/{id}/run", handler: v1Run as Handler, action: "inspection.read", request: (j) => ({ path: `/api/v1/jobs/${j.jobId}/run`, params: { jobId: String(j.jobId) } }) },
  {
    name: "GET /api/v1/jobs/{id}/run/sheets.csv",
    handler: v1RunCsv as Handler,
    action: "inspection.read",
    request: (j) => ({ path: `/api/v1/jobs/${j.jobId}/run/sheets.csv`, params: { jobId: String(j.jobId) } }),
  },
  {
    name: "GET /api/v1/jobs/{id}/run/report.pdf",
    handler: v1RunReport as Handler,
    action: "inspection.read",
    request: (j) => ({ path: `/api/v1/jobs/${j.jobId}/run/report.pdf`, params: { jobId: String(j.jobId) } }),
  },
  {
    name: "GET /api/v1/inspections/{id}/report.pdf",
    handler: v1SheetReport as Handler,
    action: "inspection.read",
    request: (j) => ({ path: `/api/v1/inspections/${j.inspectionId}/report.pdf`, params: { inspectionId: String(j.inspectionId) } }),
  },
  // --- end of press run routes ---
];

interface Caller {
  name: string;
  role: Role | null;
  customerId: number | null;
  headers: () => Promise<Record<string, string>>;
}

let plant: Plant;
let callers: Caller[];

beforeAll(async () => {
  plant = await makePlant();
  const bearer = (token: string) => async () => ({ authorization: `Bearer ${token}` });
  callers = [
    { name: "anonymous", role: null, customerId: null, headers: async () => ({}) },
    { name: "disabled user (session)", role: null, customerId: null, headers: async () => ({ cookie: await sessionCookie(plant.disabled) }) },
    { name: "disabled user (token)", role: null, customerId: null, headers: bearer(plant.disabledUserToken) },
    { name: "revoked token", role: null, customerId: null, headers: bearer(plant.revokedToken) },
    { name: "expired token", role: null, customerId: null, headers: bearer(plant.expiredToken) },
    { name: "customer of another customer (token)", role: "customer", customerId: plant.b.customerId, headers: bearer(plant.otherCustomerToken) },
    { name: "customer of another customer (session)", role: "customer", customerId: plant.b.customerId, headers: async () => ({ cookie: await sessionCookie(plant.otherCustomer) }) },
  ];
  for (const role of Object.keys(plant.actors) as Role[]) {
    const actor = plant.actors[role];
    callers.push({ name: `${role} (token)`, role, customerId: actor.customerId, headers: bearer(plant.tokens[role]) });
    callers.push({ name: `${role} (session)`, role, customerId: actor.customerId, headers: async () => ({ cookie: await sessionCookie(actor), origin: "http://127.0.0.1:3000" }) });
  }
});
afterAll(closeDb);

type Expected = "allowed" | 401 | 403 | 404;

function expected(caller: Caller, action: Action, job: PlantJob): Expected {
  if (caller.role === null) return 401;
  if (caller.role === "customer" && caller.customerId !== job.customerId) return 404;
  return POLICY_TABLE[action].includes(caller.role) ? "allowed" : 403;
}

describe("authorization matrix", () => {
  it("POLICY_TABLE is exactly what lib/auth/policy.ts decides", () => {
    for (const action of ACTIONS) {
      for (const role of ["admin", "prepress", "qa", "reviewer", "customer"] as Role[]) {
        const actor = { id: 1, role, customerId: role === "customer" ? 7 : null, name: "", email: "" };
        expect(can(actor, action, { customerId: 7 }), `${role} ${action}`).toBe(POLICY_TABLE[action].includes(role));
        if (role === "customer" && action !== "api_token.manage") expect(can(actor, action, { customerId: 8 }), `${role} ${action} other customer`).toBe(false);
      }
    }
  });

  it("answers every route for every caller as the table says", async () => {
    const mismatches: string[] = [];
    for (const route of ROUTES) {
      for (const caller of callers) {
        const want = expected(caller, route.action, plant.a);
        const response = await call(route.handler, { ...route.request(plant.a), headers: { ...(route.request(plant.a).headers ?? {}), ...(await caller.headers()) } });
        const text = await response.text();
        const got = response.status;
        const ok = want === "allowed" ? ![401, 403, 404, 500].includes(got) : got === want;
        if (!ok) mismatches.push(`${route.name} as ${caller.name}: expected ${want}, got ${got} ${text.slice(0, 120)}`);
        if (want === 404 || want === 403 || want === 401) {
          // A refusal carries the error shape and nothing of the job.
          expect(JSON.parse(text).error.code, `${route.name} as ${caller.name}`).toBeTypeOf("string");
          expect(text).not.toContain("Kettlewick");
          expect(text).not.toContain("Herbal tea");
        }
      }
    }
    expect(mismatches).toEqual([]);
  });

  it("lists only the caller's own customer's jobs; anonymous and refused tokens get 401", async () => {
    for (const caller of callers) {
      const response = await call(listJobs as Handler, { path: "/api/v1/jobs?limit=100", headers: await caller.headers() });
      if (caller.role === null) {
        expect(response.status, caller.name).toBe(401);
        continue;
      }
      expect(response.status, caller.name).toBe(200);
      const ids: number[] = [];
      let body = (await response.json()) as { items: { id: number; customerId: number }[]; nextCursor: string | null };
      ids.push(...body.items.map((i) => i.id));
      while (body.nextCursor) {
        const next = await call(listJobs as Handler, { path: `/api/v1/jobs?limit=100&cursor=${body.nextCursor}`, headers: await caller.headers() });
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

  it("refuses a cookie-authenticated change sent from another site, but not the same change with a token", async () => {
    const job = plant.b;
    const request = post(`/api/v1/inspections/${job.failedInspectionId}/retry`, { inspectionId: String(job.failedInspectionId) });
    const cookie = await sessionCookie(plant.actors.qa);
    const fromElsewhere = await call(v1Retry as Handler, { ...request, headers: { cookie, origin: "https://elsewhere.example" } });
    expect(fromElsewhere.status).toBe(403);
    expect((await fromElsewhere.json()).error.code).toBe("cross_origin");
    const crossSite = await call(v1Retry as Handler, { ...request, headers: { cookie, "sec-fetch-site": "cross-site" } });
    expect(crossSite.status).toBe(403);
    const withToken = await call(v1Retry as Handler, { ...request, headers: { authorization: `Bearer ${plant.tokens.qa}`, origin: "https://elsewhere.example" } });
    expect(withToken.status).toBe(200);
  });
});
