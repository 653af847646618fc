// Browser test of the jobs workspace: prepress creates a customer and a job (a duplicate job number gets its
// field error), moves the job on press, uploads artwork and adds an excluded area on its page picture; the
// audit trails show it; a customer user sees their own job without any control and another customer's job is a
// 404; a prepress user gets 403 on the users page. Every page is screenshot at 1366 and 768 px and checked with
// axe-core (WCAG rules of the axe-core package) for serious or critical violations.
import { createRequire } from "node:module";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { ensureProfiles } from "../pipeline/support/fixtures";
import { cartonArtwork } from "../pipeline/support/artwork";
import { createCustomer, createJob, createUser, unique } from "../db/fixtures";
import { APP_URL, artifact, openWithWorker, requireRunningApp } from "./browser";

const PASSWORD = "jobs browser password 1";
const axePath = createRequire(import.meta.url).resolve("axe-core/axe.min.js");
const SIZES = [
  ["1366", { width: 1366, height: 900 }],
  ["768", { width: 768, height: 1024 }],
] as const;

let browser: Awaited<ReturnType<typeof openWithWorker>>;
let prepress: Awaited<ReturnType<typeof createUser>>;
let admin: Awaited<ReturnType<typeof createUser>>;
let otherJob: Awaited<ReturnType<typeof createJob>>;
let existingJob: Awaited<ReturnType<typeof createJob>>;
const customerName = unique("Thornbury Honey Co.");
const jobNumber = unique("WF-E2E");
let jobUrl = "";

beforeAll(async () => {
  requireRunningApp();
  await ensureProfiles();
  prepress = await createUser({ role: "prepress", password: PASSWORD });
  admin = await createUser({ role: "admin", password: PASSWORD });
  const other = await createCustomer();
  otherJob = await createJob(other.id);
  existingJob = await createJob(other.id);
  browser = await openWithWorker();
});

afterAll(async () => {
  await browser?.close();
});

async function signIn(page: Page, email: string) {
  await browser.context.clearCookies();
  await page.goto(`${APP_URL}/sign-in`);
  await page.fill("#email", email);
  await page.fill("#password", PASSWORD);
  await page.click("button[type=submit]");
  await page.waitForURL(`${APP_URL}/`);
}

/** axe-core over the page as it stands; only serious and critical violations fail the test. */
async function axe(page: Page, name: string) {
  await page.addScriptTag({ path: axePath });
  const violations = await page.evaluate(async () => {
    const result = await (window as unknown as { axe: { run: () => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }> } }).axe.run();
    return result.violations.map((v) => ({ id: v.id, impact: v.impact, targets: v.nodes.slice(0, 3).map((n) => n.target.join(" ")) }));
  });
  const bad = violations.filter((v) => v.impact === "serious" || v.impact === "critical");
  expect(bad, `${name}: ${JSON.stringify(bad)}`).toEqual([]);
}

/** Screenshots at both widths, and axe at each. */
async function look(page: Page, name: string) {
  for (const [size, viewport] of SIZES) {
    await page.setViewportSize(viewport);
    await page.waitForTimeout(150);
    await page.screenshot({ path: artifact(`jobs-${name}-${size}.png`), fullPage: true });
    await axe(page, `${name} at ${size}`);
  }
  await page.setViewportSize(SIZES[0][1]);
}

describe("jobs workspace in the browser", () => {
  it("prepress sees what needs them now and the jobs table, filters it in the URL, and gets 403 on the users page", async () => {
    const page = await browser.context.newPage();
    await signIn(page, prepress.email);
    await page.getByRole("heading", { name: "What needs you now" }).waitFor();
    await page.getByRole("heading", { name: "Artwork waiting for approval" }).waitFor();
    await page.getByRole("link", { name: otherJob.jobNumber, exact: true }).waitFor();
    await look(page, "home-prepress");
    await page.fill("#jobs-q", existingJob.jobNumber);
    await page.getByRole("button", { name: "Search" }).click();
    await page.waitForURL(/q=/);
    await page.getByRole("link", { name: existingJob.jobNumber, exact: true }).waitFor();
    await expect.poll(() => page.getByRole("link", { name: otherJob.jobNumber, exact: true }).count()).toBe(0);
    const response = await page.goto(`${APP_URL}/admin/users`);
    expect(response?.status()).toBe(403);
    await page.getByRole("heading", { name: "This page is not open to your role" }).waitFor();
    await page.close();
  });

  it("prepress creates a customer with contacts, then a job; a duplicate job number is a field error", async () => {
    const page = await browser.context.newPage();
    await signIn(page, prepress.email);
    await page.goto(`${APP_URL}/customers/new`);
    await look(page, "customer-new");
    await page.fill("#name", customerName);
    await page.fill("#contactEmails", "quality@thornbury.example\nnot-an-address");
    await page.getByRole("button", { name: "Create customer" }).click();
    await page.getByText("“not-an-address” is not an e-mail address.").waitFor();
    await page.fill("#contactEmails", "quality@thornbury.example\nbuyer@thornbury.example");
    await page.getByRole("button", { name: "Create customer" }).click();
    await page.waitForURL(/\/customers\?saved=/);
    await page.getByRole("link", { name: `Edit ${customerName}` }).waitFor();
    await look(page, "customers");

    await page.goto(`${APP_URL}/jobs/new`);
    await page.fill("#jobNumber", existingJob.jobNumber);
    await page.selectOption("#customerId", { label: customerName });
    await page.fill("#title", "Heather Honey 340 g, carton");
    await page.fill("#stock", "GC1 folding boxboard 325 g/m²");
    await page.fill("#boardThicknessMm", "0.8");
    await page.getByText("Thicker than usual").waitFor();
    await page.fill("#boardThicknessMm", "0.46");
    await page.fill("#press", "Sheet-fed offset, 5 colours");
    await page.fill("#runLengthSheets", "9000");
    await page.fill("#upsRows", "1");
    await page.fill("#upsColumns", "2");
    await page.selectOption("#toleranceProfileId", { label: "Food and general consumer packaging" });
    await page.getByRole("button", { name: "Create job" }).click();
    await page.getByText(`Job number ${existingJob.jobNumber} is already used by another job.`).waitFor();
    expect(await page.inputValue("#title")).toBe("Heather Honey 340 g, carton");
    await look(page, "job-new-error");
    await page.fill("#jobNumber", jobNumber);
    await page.getByRole("button", { name: "Create job" }).click();
    await page.waitForURL(/\/jobs\/\d+\?created=1/);
    jobUrl = page.url().replace(/\?.*$/, "");
    await page.getByText("Food and general consumer packaging").first().waitFor();
    await page.getByRole("button", { name: "Put on press" }).click();
    await page.getByText("The job is now on press.").waitFor();
    await page.close();
  });

  it("prepress uploads artwork and adds an excluded area on its page picture", async () => {
    const page = await browser.context.newPage();
    await signIn(page, prepress.email);
    await page.goto(jobUrl);
    const { pdf } = await cartonArtwork({ rows: 1, columns: 2 });
    await page.setInputFiles("input[type=file][accept*=pdf]", { name: "heather-honey-r1.pdf", mimeType: "application/pdf", buffer: Buffer.from(pdf) });
    await page.getByText("Stored as revision 1 (draft).").waitFor();
    const picture = page.locator("svg[aria-label^='Page 210 × 148 mm']");
    await picture.waitFor({ timeout: 60_000 });
    await page.getByRole("img", { name: "Page 1 of artwork revision 1" }).waitFor();
    await page.waitForFunction(() => ((document.querySelector("img[alt^='Page 1 of artwork']") as HTMLImageElement | null)?.naturalWidth ?? 0) > 0, null, { timeout: 30_000 });
    // Typed in millimetres, inside up 1 of 105 × 148 mm.
    await page.getByRole("button", { name: "Add area" }).click();
    await page.getByText("Not saved yet").waitFor();
    await page.getByLabel("Area 1: label").fill("lot and best before");
    await page.getByLabel("Left (mm)").fill("20");
    await page.getByLabel("Top (mm)").fill("30");
    await page.getByRole("button", { name: "Save areas" }).click();
    await page.getByText("Saved 1 excluded area.").waitFor();
    await page.getByRole("button", { name: "Approve with 1 excluded area" }).waitFor();
    await look(page, "job-prepress");
    await page.getByRole("button", { name: "Approve with 1 excluded area" }).click();
    await page.getByText("(locked with the approval)").waitFor();
    await page.close();
  });

  it("the job's audit trail and the administrators' trail show who did what, filterable by kind", async () => {
    const page = await browser.context.newPage();
    await signIn(page, prepress.email);
    await page.goto(`${jobUrl}/audit`);
    const table = page.getByRole("table");
    await table.getByText("Job created").waitFor();
    await table.getByText("Excluded areas set").waitFor();
    await look(page, "job-audit");
    await page.selectOption("#audit-kind", "job.status_change");
    await page.waitForURL(/kind=job.status_change/);
    await expect.poll(() => table.getByText("Job created").count()).toBe(0);
    await table.getByText("Job status changed").first().waitFor();
    expect((await page.goto(`${APP_URL}/admin/audit`))?.status()).toBe(403);
    await signIn(page, admin.email);
    await page.goto(`${APP_URL}/admin/audit?person=${prepress.id}`);
    await page.getByRole("table").getByText("Customer created").first().waitFor();
    await look(page, "admin-audit");
    await page.close();
  });

  it("a customer user sees their own job read-only and gets 404 for another customer's job", async () => {
    const page = await browser.context.newPage();
    const jobId = Number(jobUrl.split("/").pop());
    const { db } = await import("../../db/client");
    const { jobs } = await import("../../db/schema");
    const { eq } = await import("drizzle-orm");
    const [row] = await db.select({ customerId: jobs.customerId }).from(jobs).where(eq(jobs.id, jobId));
    const buyer = await createUser({ role: "customer", customerId: row.customerId, password: PASSWORD });
    await signIn(page, buyer.email);
    await page.getByRole("link", { name: jobNumber, exact: true }).waitFor();
    await look(page, "home-customer");
    await page.goto(jobUrl);
    await page.getByRole("heading", { name: /Job/ }).first().waitFor();
    await page.getByText("Heather Honey 340 g, carton").first().waitFor();
    await page.getByText("(locked with the approval)").waitFor();
    for (const name of ["Edit job", "Put on press", "Mark completed", "Cancel job", "Upload artwork PDF", "Save areas", "Add area"]) {
      expect(await page.getByRole("button", { name }).count(), name).toBe(0);
      expect(await page.getByRole("link", { name }).count(), name).toBe(0);
    }
    expect(await page.locator("input[type=file]").count()).toBe(0);
    await look(page, "job-customer");
    expect((await page.goto(`${APP_URL}/jobs/${otherJob.id}`))?.status()).toBe(404);
    expect((await page.goto(`${APP_URL}/jobs/${otherJob.id}/audit`))?.status()).toBe(404);
    expect((await page.goto(`${APP_URL}/customers`))?.status()).toBe(403);
    await page.close();
  });
});
