// The font preflight on the job page, through the app's own pages and the real worker: prepress uploads an
// artwork PDF whose Helvetica is not embedded and sees the warning on the draft before approving; a revision with
// its font embedded carries none; the customer's user reads the same warning without any control. axe-core
// (Deque's WCAG rules engine, npm axe-core): no serious or critical violation. Screenshots at 1366 and 768 px in
// test-results/artwork-preflight-*.png.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createCustomer, createJob, createUser } from "../db/fixtures";
import { embeddedTrueTypePdf, helveticaPdf } from "../pipeline/support/font-pdfs";
import { ensureProfiles } from "../pipeline/support/fixtures";
import { APP_URL, openWithWorker, requireRunningApp, shootAndCheck, signIn } from "./browser";

const PASSWORD = "fonts are embedded 1";
let browser: Awaited<ReturnType<typeof openWithWorker>>;
let jobUrl = "";
let prepress: Awaited<ReturnType<typeof createUser>>;
let buyer: Awaited<ReturnType<typeof createUser>>;

beforeAll(async () => {
  requireRunningApp();
  await ensureProfiles();
  const customer = await createCustomer();
  const job = await createJob(customer.id);
  jobUrl = `${APP_URL}/jobs/${job.id}`;
  prepress = await createUser({ role: "prepress", password: PASSWORD });
  buyer = await createUser({ role: "customer", customerId: customer.id, password: PASSWORD });
  browser = await openWithWorker();
}, 180_000);

afterAll(async () => {
  await browser?.close();
});

const WARNING = "Fonts not embedded: Helvetica, Helvetica-Bold.";

describe("artwork preflight on the job page", () => {
  it("prepress sees the fonts a draft does not embed, and none on a revision that embeds its font", async () => {
    const page = await browser.context.newPage();
    await signIn(page, prepress.email, PASSWORD);
    await page.goto(jobUrl);
    await page.setInputFiles("input[type=file][accept*=pdf]", { name: "tea-carton-r1.pdf", mimeType: "application/pdf", buffer: Buffer.from(await helveticaPdf()) });
    await page.getByText("Stored as revision 1 (draft).").waitFor();
    await page.getByText(WARNING).waitFor({ timeout: 60_000 });
    await expect(page.getByText("upload it as a new revision before approving").count()).resolves.toBe(1);

    await page.setInputFiles("input[type=file][accept*=pdf]", { name: "tea-carton-r2.pdf", mimeType: "application/pdf", buffer: Buffer.from(await embeddedTrueTypePdf()) });
    await page.getByText("Stored as revision 2 (draft).").waitFor();
    // Revision 2's page picture appears once the worker made its preview, and with it the (empty) preflight.
    await page.locator("img[alt^='Page 1 of artwork']").first().waitFor({ timeout: 60_000 });
    await page.waitForFunction(() => ((document.querySelector("img[alt^='Page 1 of artwork']") as HTMLImageElement | null)?.naturalWidth ?? 0) > 0, null, { timeout: 60_000 });
    await expect(page.getByText("Fonts not embedded:").count()).resolves.toBe(1);
    expect(await shootAndCheck(page, "artwork-preflight-prepress")).toEqual([]);
    await page.close();
  });

  it("the customer's user reads the same warning, without upload or approve controls", async () => {
    const page = await browser.context.newPage();
    await signIn(page, buyer.email, PASSWORD);
    await page.goto(jobUrl);
    await page.getByText(WARNING).waitFor();
    await page.getByText("Prepress is asked for a PDF with all fonts embedded").waitFor();
    await page.waitForFunction(() => ((document.querySelector("img[alt^='Page 1 of artwork']") as HTMLImageElement | null)?.naturalWidth ?? 0) > 0, null, { timeout: 60_000 });
    await expect(page.getByText("Upload artwork PDF").count()).resolves.toBe(0);
    await expect(page.getByRole("button", { name: "Approve" }).count()).resolves.toBe(0);
    expect(await shootAndCheck(page, "artwork-preflight-customer")).toEqual([]);
    await page.close();
  });
});
