// The review story in the browser, on a sheet inspected by the real engine (made in the test process: the
// create-customer-and-job pages belong to another branch): a reviewer opens the viewer, zooms to a finding,
// rejects one with a comment, accepts the others with the keyboard, and signs the sheet failed with the password;
// a second reviewer's stale decision gets the conflict message naming the first; the customer sees the signed
// result and no controls; another customer gets 404. axe-core (Deque's WCAG rules engine, npm axe-core) runs on
// every page with no serious or critical violation allowed. Screenshots at 1366 and 768 px in test-results/.
import { createRequire } from "node:module";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { closeDb } from "../../db/client";
import { closeQueues } from "../../lib/queue/queues";
import { APP_URL, artifact, openBrowser, requireRunningApp } from "./browser";
import { makeStorySheet, type StorySheet } from "./support/review-sheet";

const PASSWORD = "story password 1";
const axePath = createRequire(import.meta.url).resolve("axe-core/axe.min.js");
let story: StorySheet;
let first: Awaited<ReturnType<typeof openBrowser>>;
let second: Awaited<ReturnType<typeof openBrowser>>;
const sheetUrl = () => `${APP_URL}/jobs/${story.jobId}/sheets/${story.inspectionId}`;

beforeAll(async () => {
  requireRunningApp();
  story = await makeStorySheet(PASSWORD);
  first = await openBrowser();
  second = await openBrowser();
}, 180_000);

afterAll(async () => {
  await first?.close();
  await second?.close();
  await closeQueues();
  await closeDb();
});

async function signIn(page: Page, email: string) {
  await page.goto(`${APP_URL}/sign-in`);
  await page.fill("#email", email);
  await page.fill("#password", PASSWORD);
  await page.click("button[type=submit]");
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

async function seriousViolations(page: Page) {
  await page.addScriptTag({ path: axePath });
  const result = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }> } }).axe;
    return axe.run(document, { resultTypes: ["violations"] });
  });
  return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical").map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}

async function shoot(page: Page, name: string) {
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await page.waitForTimeout(600);
    await page.screenshot({ path: artifact(`review-${name}-${width}.png`), fullPage: true });
  }
  await page.setViewportSize({ width: 1366, height: 900 });
}

const viewerReady = (page: Page) => page.waitForFunction(() => document.querySelectorAll(".openseadragon-canvas canvas, .openseadragon-canvas img").length > 0 && document.querySelectorAll(".tz-box").length > 0, null, { timeout: 30_000 });

describe("reviewing a sheet in the browser", () => {
  let reviewer: Page;
  let stale: Page;

  it("the engine found the three defects on the story sheet", () => {
    expect(story.findings).toBe(3);
  });

  it("the reviewer opens the sheet: viewer with numbered boxes, up grid, scanned area, scale bar; no serious accessibility violation", async () => {
    reviewer = await first.context.newPage();
    await signIn(reviewer, story.people.reviewer.email);
    await reviewer.goto(sheetUrl());
    await viewerReady(reviewer);
    expect(await reviewer.locator(".tz-box").count()).toBe(6); // three findings in each of the two side-by-side views
    expect(await reviewer.locator(".tz-up").count()).toBe(4);
    expect(await reviewer.locator(".tz-covered").count()).toBe(2);
    await reviewer.getByText(/^\d+(\.\d+)? mm$/).first().waitFor();
    await reviewer.locator("kbd", { hasText: "N" }).first().waitFor();
    expect(await seriousViolations(reviewer)).toEqual([]);
    await shoot(reviewer, "1-sheet");
  });

  it("the second reviewer opens the same sheet before any decision", async () => {
    stale = await second.context.newPage();
    await signIn(stale, story.people.reviewer2.email);
    await stale.goto(sheetUrl());
    await stale.getByRole("button", { name: /^Accept/ }).waitFor();
  });

  it("picking a finding zooms to it; the other compare modes draw", async () => {
    const before = await reviewer.evaluate(() => document.querySelector(".tz-box")!.getBoundingClientRect().width);
    await reviewer.getByRole("list", { name: /Findings/ }).getByRole("button").nth(2).click();
    await reviewer.waitForTimeout(1200);
    const boxes = await reviewer.evaluate(() => [...document.querySelectorAll(".tz-box")].map((b) => b.getBoundingClientRect().width));
    expect(Math.max(...boxes)).toBeGreaterThan(before * 2);
    await shoot(reviewer, "2-zoomed");
    for (const mode of ["Overlay", "Split", "Alternate"]) {
      await reviewer.getByText(mode, { exact: true }).click();
      await reviewer.waitForTimeout(500);
    }
    await reviewer.getByLabel("Difference").check();
    await reviewer.getByText("Split", { exact: true }).click();
    await viewerReady(reviewer);
    await shoot(reviewer, "3-split-difference");
    await reviewer.getByText("Side by side", { exact: true }).click();
    await reviewer.getByLabel("Difference").uncheck();
  });

  it("rejects the first finding with a comment and accepts the other two with the A key", async () => {
    const list = reviewer.getByRole("list", { name: /Findings/ });
    await list.getByRole("button").nth(0).click();
    await reviewer.getByRole("button", { name: /^Reject/ }).click();
    await expect(reviewer.getByRole("alert").filter({ hasText: "comment" }).isVisible()).resolves.toBe(true);
    await reviewer.getByLabel(/Comment/).fill("Dark spot on the honey panel, up 2: a defect");
    await reviewer.getByRole("button", { name: /^Reject/ }).click();
    await list.getByRole("button").nth(0).getByText("Rejected").waitFor();
    for (const n of [1, 2]) {
      await reviewer.locator("body").click({ position: { x: 5, y: 5 } });
      await reviewer.keyboard.press("a");
      await list.getByRole("button").nth(n).getByText("Accepted").waitFor();
    }
    await reviewer.getByText("3 of 3 decided").waitFor();
  });

  it("the second reviewer's stale decision gets the conflict message naming who decided first", async () => {
    await stale.getByRole("button", { name: /^Accept/ }).click();
    await stale.waitForTimeout(1500);
    await stale.screenshot({ path: artifact("review-debug-stale.png") });
    const message = stale.getByRole("alert").filter({ hasText: "changed this finding first" });
    await message.waitFor();
    expect(await message.textContent()).toContain(story.people.reviewer.name);
    expect(await seriousViolations(stale)).toEqual([]);
    await shoot(stale, "4-conflict");
  });

  it("a wrong password does not sign; the right one signs the sheet failed", async () => {
    await reviewer.getByLabel("My signature means").selectOption("rejected");
    await reviewer.getByLabel(/Your password/).fill("not my password");
    await reviewer.getByRole("button", { name: "Sign sheet as failed" }).click();
    await reviewer.getByRole("alert").filter({ hasText: "password is not right" }).waitFor();
    await reviewer.getByLabel(/Your password/).fill(PASSWORD);
    await reviewer.getByRole("button", { name: "Sign sheet as failed" }).click();
    await reviewer.getByText("Sheet signed failed").waitFor();
    await reviewer.getByText("The record still matches what was signed.").waitFor();
    expect(await reviewer.getByRole("button", { name: /^Accept|^Reject|^Undo/ }).count()).toBe(0);
    await shoot(reviewer, "5-signed");
  });

  it("the customer sees the signed result and no controls; another customer gets 404", async () => {
    const page = await second.context.newPage();
    await second.context.clearCookies();
    await signIn(page, story.people.customer.email);
    await page.goto(sheetUrl());
    await page.getByText("Sheet signed failed").waitFor();
    await viewerReady(page);
    expect(await page.getByRole("button", { name: /^Accept|^Reject|^Undo|^Sign sheet|^Reopen/ }).count()).toBe(0);
    expect(await page.locator("textarea, input[type=password]").count()).toBe(0);
    expect(await seriousViolations(page)).toEqual([]);
    await shoot(page, "6-customer");
    await second.context.clearCookies();
    await signIn(page, story.people.otherCustomer.email);
    const response = await page.goto(sheetUrl());
    expect(response?.status()).toBe(404);
    const tile = await page.request.get(`${APP_URL}/api/inspections/${story.inspectionId}/tiles/artwork.dzi`);
    expect(tile.status()).toBe(404);
  });
});
