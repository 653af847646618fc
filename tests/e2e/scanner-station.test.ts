// The README's scanner-station example, with fetch against the built app: upload a scan with its sheet number
// using a personal API token, poll the inspection, fetch the findings. Also: the security headers of a page and
// of an API answer, and a refused token.
import "../pipeline/support/test-env";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { smallPng } from "../pipeline/support/files";
import { makePlant, type Plant } from "../api/support";
import { APP_URL, requireRunningApp } from "./browser";

let plant: Plant;
beforeAll(async () => {
  requireRunningApp();
  plant = await makePlant();
});
afterAll(closeDb);

describe("a scanner station over HTTP", () => {
  it("uploads a scan, polls its inspection and fetches its findings", async () => {
    const auth = { authorization: `Bearer ${plant.tokens.qa}` };
    const form = new FormData();
    form.append("sheetNumber", "217");
    form.append("file", new Blob([new Uint8Array(await smallPng())], { type: "image/png" }), "sheet-0217.png");
    const upload = await fetch(`${APP_URL}/api/v1/jobs/${plant.a.jobId}/scans`, { method: "POST", headers: auth, body: form });
    expect(upload.status).toBe(201);
    const { items } = await upload.json();
    expect(items[0]).toMatchObject({ sheetNumber: 217, duplicate: false });
    const inspection = await (await fetch(`${APP_URL}/api/v1/inspections/${items[0].inspectionId}`, { headers: auth })).json();
    expect(["queued", "running", "done", "failed"]).toContain(inspection.status);
    expect(inspection.sheetNumber).toBe(217);
    const findings = await fetch(`${APP_URL}/api/v1/inspections/${plant.a.inspectionId}/findings?limit=50`, { headers: auth });
    expect(findings.status).toBe(200);
    expect((await findings.json()).items[0]).toMatchObject({ wMm: 3, hMm: 2, kind: "extra_ink" });
    const refused = await fetch(`${APP_URL}/api/v1/jobs`, { headers: { authorization: `Bearer ${plant.revokedToken}` } });
    expect(refused.status).toBe(401);
  });

  it("sends security headers on pages and API answers", async () => {
    const page = await fetch(`${APP_URL}/sign-in`);
    const csp = page.headers.get("content-security-policy") ?? "";
    expect(csp).toMatch(/script-src 'self' 'nonce-[^']+' 'strict-dynamic'/);
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("frame-ancestors 'none'");
    const nonce = /'nonce-([^']+)'/.exec(csp)![1];
    expect(await page.text()).toContain(`nonce="${nonce}"`);
    for (const response of [page, await fetch(`${APP_URL}/api/v1/openapi.json`)]) {
      expect(response.headers.get("x-content-type-options")).toBe("nosniff");
      expect(response.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
      expect(response.headers.get("x-frame-options")).toBe("DENY");
    }
  });
});
