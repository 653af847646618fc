// Headless Chromium from Debian's package, started the way a closed network and a root user need
// (flags from the project's notes), with a fresh profile each time.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext } from "playwright-core";
import { env } from "../../lib/env";

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
