// A day's work end to end in the browser, every step through the app's own pages and the real worker: prepress
// creates a customer and a job, uploads the artwork PDF, draws an excluded area on its page picture with the
// pointer (then draws a second one and removes it) and approves; QA uploads two scans with their sheet numbers
// and watches the worker inspect them; a reviewer decides every finding (a reject with its comment) and signs the sheet
// off re-entering the password; the customer's user sees the signed result of their own job and gets 404 for
// another customer's job. axe-core (Deque's WCAG rules engine, npm axe-core) runs on the job page and the sheet
// page: no serious or critical violation. Screenshots at 1366 and 768 px in test-results/story-*.png.
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { db } from "../../db/client";
import { artworkRevisions, customers } from "../../db/schema";
import { createCustomer, createJob, createUser, unique } from "../db/fixtures";
import { cartonArtwork, perfectScanPng } from "../pipeline/support/artwork";
import { ensureProfiles } from "../pipeline/support/fixtures";
import { APP_URL, openWithWorker, requireRunningApp, shootAndCheck, signIn } from "./browser";

const PASSWORD = "story of a day 1";
const SCAN_DPI = 150;
const customerName = unique("Larkspur Preserves");
const jobNumber = unique("LP-STORY");

let browser: Awaited<ReturnType<typeof openWithWorker>>;
let people: Record<"prepress" | "qa" | "reviewer", Awaited<ReturnType<typeof createUser>>>;
let otherJob: Awaited<ReturnType<typeof createJob>>;
let pdf: Uint8Array;
let jobUrl = "";
let sheetUrl = "";

beforeAll(async () => {
  requireRunningApp();
  await ensureProfiles();
  people = {
    prepress: await createUser({ role: "prepress", password: PASSWORD }),
    qa: await createUser({ role: "qa", password: PASSWORD }),
    reviewer: await createUser({ role: "reviewer", password: PASSWORD }),
  };
  otherJob = await createJob((await createCustomer()).id);
  ({ pdf } = await cartonArtwork({ rows: 1, columns: 2 }));
  browser = await openWithWorker();
}, 180_000);

afterAll(async () => {
  await browser?.close();
});

/** Drags on the page picture from one point to another, both in mm of the page. */
async function drag(page: Page, from: [number, number], to: [number, number], pageMm: [number, number]) {
  const picture = page.locator("svg[aria-label^='Page ']");
  await picture.scrollIntoViewIfNeeded();
  const box = (await picture.boundingBox())!;
  const at = ([x, y]: [number, number]) => [box.x + (x / pageMm[0]) * box.width, box.y + (y / pageMm[1]) * box.height] as const;
  await page.mouse.move(...at(from));
  await page.mouse.down();
  await page.mouse.move(...at(to), { steps: 8 });
  await page.mouse.up();
}

describe("a day's work, end to end in the browser", () => {
  it("prepress creates the customer and the job", async () => {
    const page = await browser.context.newPage();
    await signIn(page, people.prepress.email, PASSWORD);
    await page.goto(`${APP_URL}/customers/new`);
    await page.fill("#name", customerName);
    await page.fill("#contactEmails", "quality@larkspur.example");
    await page.getByRole("button", { name: "Create customer" }).click();
    await page.waitForURL(/\/customers\?saved=/);
    await page.goto(`${APP_URL}/jobs/new`);
    await page.fill("#jobNumber", jobNumber);
    await page.selectOption("#customerId", { label: customerName });
    await page.fill("#title", "Damson jam 340 g, folding carton");
    await page.fill("#upsRows", "1");
    await page.fill("#upsColumns", "2");
    await page.selectOption("#toleranceProfileId", { label: "Food and general consumer packaging" });
    await page.getByRole("button", { name: "Create job" }).click();
    await page.waitForURL(/\/jobs\/\d+\?created=1/);
    jobUrl = page.url().replace(/\?.*$/, "");
    await page.close();
  });

  it("prepress uploads the artwork, draws an excluded area with the pointer, edits it, removes a second one, and approves", async () => {
    const page = await browser.context.newPage();
    await signIn(page, people.prepress.email, PASSWORD);
    await page.goto(jobUrl);
    await page.setInputFiles("input[type=file][accept*=pdf]", { name: "damson-jam-r1.pdf", mimeType: "application/pdf", buffer: Buffer.from(pdf) });
    await page.getByText("Stored as revision 1 (draft).").waitFor();
    await page.locator("svg[aria-label^='Page 210 × 148 mm']").waitFor({ timeout: 60_000 });
    await page.waitForFunction(() => ((document.querySelector("img[alt^='Page 1 of artwork']") as HTMLImageElement | null)?.naturalWidth ?? 0) > 0, null, { timeout: 60_000 });

    // Two ups side by side: "every up" is the default for drawing. Drawn in up 1, from 20 to 60 mm across and
    // 100 to 120 mm down; the ups' grid decides the up's origin, so the typed numbers are checked against it.
    const [revision] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.originalFilename, "damson-jam-r1.pdf"));
    const upX = (revision.upsAreaXUm ?? 0) / 1000;
    const upY = (revision.upsAreaYUm ?? 0) / 1000;
    await drag(page, [upX + 20, upY + 100], [upX + 60, upY + 120], [210, 148]);
    await page.getByText("Not saved yet").waitFor();
    const typed = async (label: string) => Number(await page.getByLabel(label).first().inputValue());
    // One screen pixel of the picture is about 0.3 mm here: the drawn area lands within 0.6 mm.
    expect(Math.abs((await typed("Left (mm)")) - 20)).toBeLessThan(0.6);
    expect(Math.abs((await typed("Top (mm)")) - 100)).toBeLessThan(0.6);
    expect(Math.abs((await typed("Width (mm)")) - 40)).toBeLessThan(0.6);
    expect(Math.abs((await typed("Height (mm)")) - 20)).toBeLessThan(0.6);
    await page.getByLabel("Area 1: label").fill("lot and best before");
    await page.getByLabel("Width (mm)").first().fill("42");
    // A second one on the sheet, then removed again.
    await page.getByLabel("New areas cover").selectOption("sheet");
    await drag(page, [5, 5], [30, 15], [210, 148]);
    await page.getByLabel("Area 2: label").waitFor();
    await page.getByRole("button", { name: "Remove area 2" }).click();
    expect(await page.getByLabel("Area 2: label").count()).toBe(0);
    await page.getByRole("button", { name: "Save areas" }).click();
    await page.getByText("Saved 1 excluded area.").waitFor();
    const [saved] = await db.select().from(artworkRevisions).where(eq(artworkRevisions.id, revision.id));
    expect(saved.excludedAreas).toHaveLength(1);
    expect(saved.excludedAreas[0]).toMatchObject({ scope: "up", label: "lot and best before", w: 42 });
    expect(await shootAndCheck(page, "story-job-prepress")).toEqual([]);
    await page.getByRole("button", { name: "Approve with 1 excluded area" }).click();
    await page.getByText("(locked with the approval)").waitFor();
    await page.close();
  });

  it("QA uploads two scans with their sheet numbers and watches the worker inspect them", async () => {
    const page = await browser.context.newPage();
    await signIn(page, people.qa.email, PASSWORD);
    await page.goto(jobUrl);
    // Sheet 3141 carries two ink spots (hickeys), one in each up, away from the excluded area; sheet 3142 is clean.
    const clean = await perfectScanPng(pdf, SCAN_DPI);
    const dot = Buffer.from(`<svg width="40" height="40"><circle cx="20" cy="20" r="6" fill="#1a1a1a"/></svg>`);
    const spotted = await sharp(clean).composite([{ input: dot, left: 300, top: 250 }, { input: dot, left: 900, top: 300 }]).png().toBuffer();
    await page.setInputFiles("input[type=file][accept*=tiff]", [
      { name: "press-pull-3141.png", mimeType: "image/png", buffer: spotted },
      { name: "press-pull-3142.png", mimeType: "image/png", buffer: clean },
    ]);
    await page.getByLabel("Sheet number of press-pull-3141.png").fill("3141");
    await page.getByLabel("Sheet number of press-pull-3142.png").fill("3142");
    await page.getByRole("button", { name: "Upload", exact: true }).click();
    await page.getByText(/sheet 3142/i).first().waitFor({ timeout: 60_000 });
    const opens = page.getByRole("link", { name: "Open sheet" });
    await expect.poll(() => opens.count(), { timeout: 300_000, interval: 1000 }).toBe(2);
    const spottedRow = page.getByRole("row").filter({ hasText: "press-pull-3141.png" });
    sheetUrl = new URL((await spottedRow.getByRole("link", { name: "Open sheet" }).getAttribute("href"))!, APP_URL).toString();
    expect(await shootAndCheck(page, "story-job-qa")).toEqual([]);
    await page.close();
  }, 400_000);

  it("the reviewer decides every finding, rejecting one with a comment, and signs the sheet off with the password", async () => {
    const page = await browser.context.newPage();
    await signIn(page, people.reviewer.email, PASSWORD);
    await page.goto(sheetUrl);
    const list = page.getByRole("list", { name: /Findings/ });
    await list.getByRole("button").first().waitFor();
    const count = await list.getByRole("button").count();
    expect(count).toBeGreaterThanOrEqual(2);
    expect(await shootAndCheck(page, "story-sheet-reviewer")).toEqual([]);
    await list.getByRole("button").nth(0).click();
    await page.getByLabel(/Comment/).fill("Ink spot on the front panel of up 1: a hickey");
    await page.getByRole("button", { name: /^Reject/ }).click();
    await list.getByRole("button").nth(0).getByText("Rejected").waitFor();
    for (let n = 1; n < count; n++) {
      await list.getByRole("button").nth(n).click();
      await page.getByRole("button", { name: /^Accept/ }).click();
      await list.getByRole("button").nth(n).getByText("Accepted").waitFor();
    }
    await page.getByText(`${count} of ${count} decided`).waitFor();
    await page.getByLabel("My signature means").selectOption("rejected");
    await page.getByLabel(/Your password/).fill(PASSWORD);
    await page.getByRole("button", { name: "Sign sheet as failed" }).click();
    await page.getByText("Sheet signed failed").waitFor();
    await page.getByText("Signed: failed", { exact: true }).waitFor();
    expect(await shootAndCheck(page, "story-sheet-signed")).toEqual([]);
    await page.close();
  });

  it("the customer's user sees the signed result of their own job, without controls, and 404 for another customer's job", async () => {
    const [customer] = await db.select().from(customers).where(eq(customers.name, customerName));
    const buyer = await createUser({ role: "customer", customerId: customer.id, password: PASSWORD });
    const page = await browser.context.newPage();
    await signIn(page, buyer.email, PASSWORD);
    await page.goto(jobUrl);
    await page.getByText("Damson jam 340 g, folding carton").first().waitFor();
    expect(await page.locator("input[type=file]").count()).toBe(0);
    expect(await shootAndCheck(page, "story-job-customer")).toEqual([]);
    await page.goto(sheetUrl);
    await page.getByText("Sheet signed failed").waitFor();
    await page.getByText("Ink spot on the front panel of up 1: a hickey").first().waitFor();
    expect(await page.getByRole("button", { name: /^Accept|^Reject|^Undo|^Sign sheet|^Reopen/ }).count()).toBe(0);
    expect(await shootAndCheck(page, "story-sheet-customer")).toEqual([]);
    expect((await page.goto(`${APP_URL}/jobs/${otherJob.id}`))?.status()).toBe(404);
    const api = await page.request.get(`${APP_URL}/api/jobs/${otherJob.id}`);
    expect(api.status()).toBe(404);
    expect(await api.text()).not.toContain(otherJob.jobNumber);
    await page.close();
  });
});
