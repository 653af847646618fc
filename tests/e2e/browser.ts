// Headless Chromium from Debian's package, started the way a closed network and a root user need
// (flags from the project's notes), with a fresh profile each time.
import fs from "node:fs";
import { createRequire } from "node:module";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { closeDb } from "../../db/client";
import { env } from "../../lib/env";
import { startWorker } from "../pipeline/support/worker-process";

export const APP_URL = env.APP_URL;

export function requireRunningApp() {
  if (process.env.TYMPAN_APP_READY !== "1") {
    throw new Error("The browser tests need the built app: run them through `npm test -- tests/e2e`.");
  }
}

export async function openBrowser(): Promise<{ context: BrowserContext; close: () => Promise<void> }> {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), "tympan-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  return {
    context,
    close: async () => {
      await context.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

export const artifact = (name: string) => {
  const dir = path.resolve("test-results");
  fs.mkdirSync(dir, { recursive: true });
  return path.join(dir, name);
};

const axePath = createRequire(import.meta.url).resolve("axe-core/axe.min.js");

/** Signs `email` in on a fresh session of the page's browser and waits until it left the sign-in page. */
export async function signIn(page: Page, email: string, password: string) {
  await page.context().clearCookies();
  await page.goto(`${APP_URL}/sign-in`);
  await page.fill("#email", email);
  await page.fill("#password", password);
  await page.click("button[type=submit]");
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

/** axe-core (Deque's WCAG rules engine, npm axe-core) over the page as it stands: its serious and critical violations. */
export async function seriousViolations(page: Page): Promise<string[]> {
  await page.addScriptTag({ path: axePath });
  const result = await page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }> } }).axe;
    return axe.run(document, { resultTypes: ["violations"] });
  });
  return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical").map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
}

/** Full-page screenshots at 1366 and 768 px wide in test-results/, with axe's serious findings at each width. */
export async function shootAndCheck(page: Page, name: string): Promise<string[]> {
  const violations: string[] = [];
  for (const width of [1366, 768]) {
    await page.setViewportSize({ width, height: width === 768 ? 1024 : 900 });
    await page.waitForTimeout(400);
    await page.screenshot({ path: artifact(`${name}-${width}.png`), fullPage: true });
    violations.push(...(await seriousViolations(page)).map((v) => `${width}px ${v}`));
  }
  await page.setViewportSize({ width: 1366, height: 900 });
  return violations;
}

/** The real worker and a browser for a story through the app; `close` stops both and the test's database pool. */
export async function openWithWorker(): Promise<{ context: BrowserContext; close: () => Promise<void> }> {
  const worker = startWorker();
  await worker.waitFor(/worker ready/);
  const browser = await openBrowser();
  return {
    context: browser.context,
    close: async () => {
      await browser.close();
      await worker.stop("SIGTERM");
      await closeDb();
    },
  };
}
