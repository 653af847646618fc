// Bad input to /api/v1: property-based (fast-check) over every query parameter and path id and over JSON bodies
// (lib/api/http.ts readJson, which every JSON route reads through); malformed multipart; absurd sheet numbers and
// resolutions; very long, right-to-left, combining and NUL-carrying text. Each gets a clear 4xx in the error
// shape, nothing is stored, and the next good request still works.
import "../pipeline/support/test-env";
import { count, eq } from "drizzle-orm";
import fc from "fast-check";
import { z } from "zod";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { scans } from "@/db/schema";
import { readJson } from "@/lib/api/http";
import { AppError } from "@/lib/errors";
import { listKeys } from "@/storage/objects";
import { smallPng } from "../pipeline/support/files";
import { call, makePlant, type Handler, type Plant } from "./support";

const { GET: listJobs } = await import("@/app/api/v1/jobs/route");
const { GET: getJob } = await import("@/app/api/v1/jobs/[jobId]/route");
const { GET: getFindings } = await import("@/app/api/v1/inspections/[inspectionId]/findings/route");
const { GET: getInspection } = await import("@/app/api/v1/inspections/[inspectionId]/route");
const { POST: postScans } = await import("@/app/api/v1/jobs/[jobId]/scans/route");
const { POST: approve } = await import("@/app/api/v1/artwork-revisions/[revisionId]/approve/route");

let plant: Plant;
let auth: Record<string, string>;
let png: Buffer;
beforeAll(async () => {
  plant = await makePlant();
  auth = { authorization: `Bearer ${plant.tokens.admin}` };
  png = await smallPng();
});
afterAll(closeDb);

const nasty = fc.oneof(
  fc.string({ maxLength: 50 }),
  fc.string({ unit: "binary", maxLength: 50 }),
  fc.constantFrom("0", "-1", "9223372036854775808", "1e3", "NaN", "Infinity", "0x10", " 7 ", "١٢", "\u0000", "a".repeat(10_000), "%00", "[]", "{}"),
);

async function expectClear4xx(response: Response, allowed: number[]) {
  expect(allowed).toContain(response.status);
  if (response.status >= 400) {
    const body = await response.json();
    expect(body.error.code).toMatch(/^[a-z_]+$/);
    expect(body.error.message.length).toBeLessThan(400);
    expect(JSON.stringify(body)).not.toMatch(/at \w+ \(|\/work\/|node_modules|SELECT|INSERT/);
  }
}

describe("bad input", () => {
  it("query parameters: any limit or cursor is a page or a 400", async () => {
    await fc.assert(
      fc.asyncProperty(nasty, nasty, fc.constantFrom("limit", "cursor", "other"), async (a, b, name) => {
        const query = new URLSearchParams({ [name]: a, ...(name === "other" ? {} : { cursor: b }) });
        await expectClear4xx(await call(listJobs as Handler, { path: `/api/v1/jobs?${query}`, headers: auth }), [200, 400]);
        await expectClear4xx(
          await call(getFindings as Handler, { path: `/api/v1/inspections/1/findings?${query}`, params: { inspectionId: String(plant.a.inspectionId) }, headers: auth }),
          [200, 400],
        );
      }),
      { numRuns: 60 },
    );
  });

  it("path ids: anything but a known id is a 404", async () => {
    await fc.assert(
      // A random short string of digits may be a real id ("1" is the first job), so those are left out.
      fc.asyncProperty(nasty.filter((id) => !/^\s*0*[1-9]\d{0,8}\s*$/.test(id)), async (id) => {
        await expectClear4xx(await call(getJob as Handler, { path: "/x", params: { jobId: id }, headers: auth }), [404]);
        await expectClear4xx(await call(getInspection as Handler, { path: "/x", params: { inspectionId: id }, headers: auth }), [404]);
        await expectClear4xx(await call(approve as Handler, { method: "POST", path: "/x", params: { revisionId: id }, headers: auth }), [404]);
      }),
      { numRuns: 60 },
    );
  });

  it("JSON bodies: any bytes are read, or refused with 400, 413, 415 or 422", async () => {
    const schema = z.object({ name: z.string().trim().min(1).max(200), upsRows: z.number().int().min(1).max(50) }).strict();
    await fc.assert(
      fc.asyncProperty(
        fc.oneof(fc.string(), fc.json(), fc.jsonValue().map((v) => JSON.stringify(v)), fc.constantFrom('{"name":"\u0000","upsRows":0}', '{"name":"x","upsRows":9223372036854775808}', "{", "")),
        fc.constantFrom("application/json", "text/plain", "application/json; charset=utf-8", ""),
        async (body, type) => {
          const request = new Request("http://127.0.0.1/x", { method: "POST", body, headers: type ? { "content-type": type } : {} });
          try {
            await readJson(request, schema);
          } catch (error) {
            expect(error).toBeInstanceOf(AppError);
            expect([400, 413, 415, 422]).toContain((error as AppError).status);
          }
        },
      ),
      { numRuns: 300 },
    );
    const huge = new Request("http://127.0.0.1/x", { method: "POST", body: JSON.stringify({ name: "x".repeat(100_000) }), headers: { "content-type": "application/json" } });
    await expect(readJson(huge, schema)).rejects.toMatchObject({ status: 413 });
  });

  it("absurd sheet numbers and resolutions are refused with 422 and store nothing", async () => {
    const before = await storedScans();
    const cases: Record<string, string>[] = [
      { sheetNumber: "0" },
      { sheetNumber: "-1" },
      { sheetNumber: "9223372036854775808" },
      { sheetNumber: "12\u0000" },
      { sheetNumber: "x".repeat(10_000) },
      { sheetNumber: "١٢" },
      { dpi: "0" },
      { dpi: "100000" },
      { dpi: "-300" },
      { dpi: "300.5" },
      { profile: "\u202Eno-such-profile" },
    ];
    for (const fields of cases) {
      const response = await postScans(scanUpload(fields, "sheet.png"), { params: Promise.resolve({ jobId: String(plant.a.jobId) }) });
      await expectClear4xx(response, [422]);
    }
    expect(await storedScans()).toEqual(before);
  });

  it("malformed multipart bodies are refused with 400 or 415 and store nothing", async () => {
    const before = await storedScans();
    const bodies: [string, BodyInit][] = [
      ["multipart/form-data", "no boundary at all"],
      ["multipart/form-data; boundary=XYZ", "--XYZ\r\nContent-Disposition: form-data; name=\"file\"; filename=\"a.png\"\r\n\r\n\u0089PNG trunc"],
      ["multipart/form-data; boundary=XYZ", "--XYZ--\r\n"],
      ["multipart/form-data; boundary=XYZ", "garbage without any boundary line"],
      ["application/octet-stream", new Uint8Array(png)],
      ["text/plain", "hello"],
    ];
    for (const [type, body] of bodies) {
      const response = await call(postScans as Handler, { method: "POST", path: "/x", params: { jobId: String(plant.a.jobId) }, headers: { ...auth, "content-type": type }, body });
      await expectClear4xx(response, [400, 415]);
    }
    expect(await storedScans()).toEqual(before);
  });

  it("keeps long, right-to-left and combining file names as text, and refuses none of them silently", async () => {
    const names = ["ورقة-٠٠١٧.png", "e\u0301\u0301\u0301-sheet-31.png", `${"長".repeat(10_000)}-32.png`];
    for (const [i, name] of names.entries()) {
      const data = Buffer.concat([png, Buffer.from([i])]);
      const form = new FormData();
      form.append("sheetNumber", String(40 + i));
      form.append("file", new Blob([new Uint8Array(data)]), name);
      const response = await postScans(new Request("http://127.0.0.1/x", { method: "POST", body: form, headers: auth }), { params: Promise.resolve({ jobId: String(plant.a.jobId) }) });
      await expectClear4xx(response, [201, 422]);
    }
    // The process is still up and answering.
    expect((await call(getJob as Handler, { path: "/x", params: { jobId: String(plant.a.jobId) }, headers: auth })).status).toBe(200);
  });
});

function scanUpload(fields: Record<string, string>, name: string): Request {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  form.append("file", new Blob([new Uint8Array(png)]), name);
  return new Request("http://127.0.0.1/x", { method: "POST", body: form, headers: auth });
}

async function storedScans() {
  const [{ n }] = await db.select({ n: count() }).from(scans).where(eq(scans.jobId, plant.a.jobId));
  return { rows: n, objects: (await listKeys("scans/")).length };
}
