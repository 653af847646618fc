// Browser smoke test against the built app: sign in, see the dashboard with only one's own customer's jobs,
// sign out. Screenshots are kept in test-results/ for a person to look at.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { closeDb } from "../../db/client";
import { SIGN_IN_FAILED_MESSAGE } from "../../lib/auth/credentials";
import { createCustomer, createJob, createUser } from "../db/fixtures";
import { APP_URL, artifact, openBrowser, requireRunningApp } from "./browser";

const PASSWORD = "browser password 1";
let browser: Awaited<ReturnType<typeof openBrowser>>;
let buyer: Awaited<ReturnType<typeof createUser>>;
let disabled: Awaited<ReturnType<typeof createUser>>;
let ownJob: Awaited<ReturnType<typeof createJob>>;
let otherJob: Awaited<ReturnType<typeof createJob>>;

beforeAll(async () => {
  requireRunningApp();
  const [own, other] = [await createCustomer(), await createCustomer()];
  ownJob = await createJob(own.id);
  otherJob = await createJob(other.id);
  buyer = await createUser({ role: "customer", customerId: own.id, password: PASSWORD });
  disabled = await createUser({ role: "reviewer", password: PASSWORD, disabled: true });
  browser = await openBrowser();
});

afterAll(async () => {
  await browser?.close();
  await closeDb();
});

async function signIn(page: Page, email: string, password: string) {
  await page.goto(`${APP_URL}/sign-in`);
  await page.fill("#email", email);
  await page.fill("#password", password);
  await page.click("button[type=submit]");
}

async function failureText(page: Page) {
  const alert = page.locator("form [role=alert]");
  await alert.waitFor();
  return (await alert.textContent())?.trim();
}

describe("in the browser", () => {
  it("sends a visitor who is not signed in to the sign-in page", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${APP_URL}/`);
    await page.waitForURL(/\/sign-in/);
    await expect(page.locator("h1").textContent()).resolves.toBe("Sign in");
    await page.close();
  });

  it("shows the same message for a wrong password, an unknown e-mail and a disabled account", async () => {
    const page = await browser.context.newPage();
    await signIn(page, buyer.email, "not the password");
    const wrong = await failureText(page);
    await signIn(page, "nobody-at-all@tests.example", PASSWORD);
    const unknown = await failureText(page);
    await signIn(page, disabled.email, PASSWORD);
    const refused = await failureText(page);
    expect(wrong).toBe(SIGN_IN_FAILED_MESSAGE);
    expect(unknown).toBe(wrong);
    expect(refused).toBe(wrong);
    expect(page.url()).toContain("/sign-in");
    await page.close();
  });

  for (const [size, viewport] of [
    ["desktop", { width: 1440, height: 900 }],
    ["tablet", { width: 820, height: 1180 }],
  ] as const) {
    it(`signs in and shows the customer's own jobs only (${size})`, async () => {
      await browser.context.clearCookies();
      const page = await browser.context.newPage();
      await page.setViewportSize(viewport);
      await signIn(page, buyer.email, PASSWORD);
      await page.waitForURL(`${APP_URL}/`);
      await page.getByRole("heading", { name: "Jobs", exact: true }).waitFor();
      // The jobs table is fetched by the page after it loads.
      await page.getByRole("link", { name: ownJob.jobNumber, exact: true }).waitFor();
      await expect(page.getByRole("link", { name: ownJob.jobNumber, exact: true }).count()).resolves.toBe(1);
      await expect(page.getByText(otherJob.jobNumber).count()).resolves.toBe(0);
      await expect(page.getByText("a spectrophotometer decides").count()).resolves.toBeGreaterThan(0);
      await page.screenshot({ path: artifact(`e2e-dashboard-${size}.png`), fullPage: true });
      await page.close();
    });
  }

  it("signs out back to the sign-in page", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${APP_URL}/`);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    await page.goto(`${APP_URL}/`);
    await page.waitForURL(/\/sign-in/);
    await page.close();
  });
});
