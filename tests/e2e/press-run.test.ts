// The press run in the browser: a run of five sheets (1001–1005, invented, made in the test process) where the
// third fails. A reviewer accepts a finding on sheet 1001 with the A key; on sheet 1002 the finding at the same
// place is pre-marked "Accepted on sheet 1001" and confirmed with the C key. The run page shows the span to pull
// (sheet 1003, between passed sheets 1002 and 1004), the run chart opens a sheet on click, the CSV has a header
// and five records (RFC 4180 CRLF), and the run report is a PDF. axe-core (Deque's WCAG rules engine) finds no
// serious or critical violation on the run page. Screenshots at 1366 and 768 px in test-results/.
import { createRequire } from "node:module";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { closeDb, db } from "../../db/client";
import { closeQueues } from "../../lib/queue/queues";
import { decideFinding } from "../../lib/review/decisions";
import { signSheet } from "../../lib/review/signoff";
import { refreshRunMemory } from "../../lib/run/memory-store";
import { makeRun, PASSWORD, type RunFixture } from "../run/support";
import { APP_URL, artifact, openBrowser, requireRunningApp } from "./browser";

const axePath = createRequire(import.meta.url).resolve("axe-core/axe.min.js");
let run: RunFixture;
let browser: Awaited<ReturnType<typeof openBrowser>>;
let page: Page;
const sheet = (n: number) => run.sheets.find((s) => s.sheetNumber === n)!;
const sheetUrl = (n: number) => `${APP_URL}/jobs/${run.jobId}/sheets/${sheet(n).inspectionId}`;

beforeAll(async () => {
  requireRunningApp();
  // Sheets 1001 and 1002 have a spot at the same place of up 1; sheet 1003 a defect elsewhere.
  run = await makeRun([
    { sheetNumber: 1001, drift: 1.1, findings: [[40_000, 30_000, 1]] },
    { sheetNumber: 1002, drift: 1.3, findings: [[40_150, 30_050, 1]] },
    { sheetNumber: 1003, drift: 4.6, findings: [[120_000, 80_000, 2]] },
    { sheetNumber: 1004, drift: 1.2 },
    { sheetNumber: 1005, drift: 0.9 },
  ]);
  await refreshRunMemory(db, run.revisionId);
  browser = await openBrowser();
  page = await browser.context.newPage();
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await closeQueues();
  await closeDb();
});

async function shoot(name: string) {
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await page.waitForTimeout(700);
    await page.screenshot({ path: artifact(`press-run-${name}-${width}.png`), fullPage: true });
  }
  await page.setViewportSize({ width: 1366, height: 900 });
}

async function seriousViolations() {
  await page.addScriptTag({ path: axePath });
  const result = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }> } }).axe;
    return axe.run(document, { resultTypes: ["violations"] });
  });
  return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical").map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}

describe("the press run in the browser", () => {
  it("the reviewer accepts the finding on sheet 1001 with the A key", async () => {
    await page.goto(`${APP_URL}/sign-in`);
    await page.fill("#email", run.actors.reviewer.email);
    await page.fill("#password", PASSWORD);
    await page.click("button[type=submit]");
    await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
    await page.goto(sheetUrl(1001));
    await page.getByRole("button", { name: /^Accept/ }).waitFor();
    await page.locator("body").click({ position: { x: 5, y: 5 } });
    await page.keyboard.press("a");
    await page.getByText("1 of 1 decided").waitFor();
  });

  it("on sheet 1002 the finding at the same place is pre-marked, not decided, and C confirms it", async () => {
    await page.goto(sheetUrl(1002));
    const suggestion = page.getByTestId("prior-suggestion");
    await suggestion.waitFor();
    expect(await suggestion.textContent()).toContain("Accepted on sheet 1001");
    await page.getByText("0 of 1 decided").waitFor();
    await shoot("sheet-premarked");
    await page.locator("body").click({ position: { x: 5, y: 5 } });
    await page.keyboard.press("c");
    await page.getByText("1 of 1 decided").waitFor();
    await page.getByText("Run memory suggested the decision of sheet 1001.").waitFor();
  });

  it("the run page shows the span to pull around failed sheet 1003 and the sampling", async () => {
    // Signing is covered in tests/e2e/review.test.ts; here the sheets are signed through the same library calls.
    const r = run.actors.reviewer;
    await decideFinding(r, { inspectionId: sheet(1003).inspectionId, findingId: sheet(1003).findingIds[0], version: 0, decision: "rejected", reason: "defect", comment: "Scuffed varnish across up 2" });
    await signSheet(r, { inspectionId: sheet(1003).inspectionId, verdict: "failed", meaning: "rejected", password: PASSWORD });
    for (const n of [1001, 1002, 1004, 1005]) await signSheet(r, { inspectionId: sheet(n).inspectionId, verdict: "passed", meaning: "reviewed", password: PASSWORD });
    await page.goto(`${APP_URL}/jobs/${run.jobId}`);
    await page.getByRole("link", { name: /Press run: traceability/ }).click();
    await page.waitForURL(/\/run$/);
    expect(await page.getByTestId("spans").textContent()).toContain("Pull sheet 1003 (1 sheet)");
    expect(await page.getByTestId("sampling").textContent()).toBe("5 of 400 sheets, about one in 80");
    const rows = page.locator("tbody tr");
    expect(await rows.count()).toBe(5);
    expect(await rows.nth(2).textContent()).toContain("Failed");
    await page.locator("[data-testid=run-chart] [data-sheet]").first().waitFor();
    expect(await seriousViolations()).toEqual([]);
    await shoot("run");
  });

  it("the CSV has a header and five records; the run report is a PDF", async () => {
    const csvHref = await page.getByRole("link", { name: /Download sheets/ }).getAttribute("href");
    const csv = await page.request.get(`${APP_URL}${csvHref}`);
    expect(csv.status()).toBe(200);
    expect(csv.headers()["content-type"]).toContain("text/csv");
    const text = await csv.text();
    const records = text.split("\r\n").filter(Boolean);
    expect(records).toHaveLength(6);
    expect(records[0]).toBe("sheet number,scan file,scan sha256,inspected at,findings,rejected findings,verdict,signed by,signed at,span to pull");
    expect(records[3]).toMatch(/^1003,sheet-1003\.png,[0-9a-f]{64},.*,1,1,failed,.*,sheet 1003$/);
    const reportHref = await page.getByRole("link", { name: /Run report/ }).getAttribute("href");
    const report = await page.request.get(`${APP_URL}${reportHref}`);
    expect(report.status()).toBe(200);
    expect(report.headers()["content-type"]).toBe("application/pdf");
    expect((await report.body()).subarray(0, 5).toString()).toBe("%PDF-");
  });

  it("clicking a point of the run chart opens that sheet", async () => {
    await page.locator("[data-testid=run-chart] [data-sheet='1004']").click();
    await page.waitForURL(new RegExp(`/sheets/${sheet(1004).inspectionId}$`));
    await page.getByRole("heading", { name: "Sheet 1004" }).waitFor();
  });
});
