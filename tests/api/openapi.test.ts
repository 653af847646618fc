// The OpenAPI document is valid OpenAPI 3.1 (checked by @seriousme/openapi-schema-validator, which validates
// against the OpenAPI Initiative's published JSON Schema for 3.1), names every /api/v1 route handler, and the
// answers of the handlers match the zod schemas the document was made from.
import "../pipeline/support/test-env";
import { readdirSync, statSync } from "node:fs";
import path from "node:path";
import { Validator } from "@seriousme/openapi-schema-validator";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import * as schemas from "@/lib/api/schemas";
import { call, makePlant, type Handler, type Plant } from "./support";

const { GET: openapi } = await import("@/app/api/v1/openapi.json/route");
const { GET: listJobs } = await import("@/app/api/v1/jobs/route");
const { GET: getJob } = await import("@/app/api/v1/jobs/[jobId]/route");
const { GET: getInspection } = await import("@/app/api/v1/inspections/[inspectionId]/route");
const { GET: getFindings } = await import("@/app/api/v1/inspections/[inspectionId]/findings/route");

let plant: Plant;
beforeAll(async () => {
  plant = await makePlant();
});
afterAll(closeDb);

function routeFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    return statSync(full).isDirectory() ? routeFiles(full) : name === "route.ts" ? [full] : [];
  });
}

describe("OpenAPI document", () => {
  it("is valid OpenAPI 3.1", async () => {
    const document = await openapi().json();
    const validator = new Validator();
    const result = await validator.validate(document);
    expect(result.errors ?? []).toEqual([]);
    expect(result.valid).toBe(true);
    expect(validator.version).toBe("3.1");
  });

  it("describes every /api/v1 route handler", async () => {
    const document = await openapi().json();
    const root = path.resolve("app/api/v1");
    const documented = Object.keys(document.paths).map((p) => p.replace(/\{(\w+)\}/g, "[$1]"));
    for (const file of routeFiles(root)) {
      const route = "/api/v1" + path.dirname(file).slice(root.length);
      if (route.endsWith("openapi.json")) continue;
      expect(documented, route).toContain(route);
    }
  });

  it("matches what the handlers answer", async () => {
    const headers = { authorization: `Bearer ${plant.tokens.admin}` };
    const jobs = await call(listJobs as Handler, { path: "/api/v1/jobs?limit=2", headers });
    expect(schemas.JobPage.parse(await jobs.json()).items.length).toBeLessThanOrEqual(2);
    const job = await call(getJob as Handler, { path: "/x", params: { jobId: String(plant.a.jobId) }, headers });
    schemas.JobDetail.parse(await job.json());
    const inspection = await call(getInspection as Handler, { path: "/x", params: { inspectionId: String(plant.a.inspectionId) }, headers });
    const body = schemas.Inspection.parse(await inspection.json());
    expect(body.alignment?.txMm).toBe(1.2);
    expect(body.coveredArea?.wMm).toBe(420);
    const findings = await call(getFindings as Handler, { path: "/x", params: { inspectionId: String(plant.a.inspectionId) }, headers });
    expect(schemas.FindingPage.parse(await findings.json()).items[0].wMm).toBe(3);
  });
});
