// Every page of the app at 1366 and 768 px, as the person it is for: screenshots in test-results/pages-*.png and
// axe-core (Deque's WCAG rules engine, npm axe-core) with no serious or critical violation. The sheet page, which
// needs an inspected scan, is swept by the story and review tests (tests/e2e/story.test.ts, review.test.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { createInvite } from "@/lib/users/invites";
import { createCustomer, createJob, createUser } from "../db/fixtures";
import { APP_URL, openBrowser, requireRunningApp, shootAndCheck, signIn } from "./browser";

const PASSWORD = "every page 1";

let browser: Awaited<ReturnType<typeof openBrowser>>;
let admin: Awaited<ReturnType<typeof createUser>>;
let customerUser: Awaited<ReturnType<typeof createUser>>;
let customerId: number;
let jobId: number;
let inviteToken: string;

beforeAll(async () => {
  requireRunningApp();
  customerId = (await createCustomer()).id;
  jobId = (await createJob(customerId)).id;
  admin = await createUser({ role: "admin", password: PASSWORD });
  customerUser = await createUser({ role: "customer", customerId, password: PASSWORD });
  const invited = await createUser({ role: "qa" });
  inviteToken = (await db.transaction((tx) => createInvite(tx, invited.id, admin.id))).token;
  browser = await openBrowser();
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await closeDb();
});

async function sweep(who: string, email: string | null, paths: string[]): Promise<string[]> {
  const page = await browser.context.newPage();
  if (email) await signIn(page, email, PASSWORD);
  const violations: string[] = [];
  for (const path of paths) {
    const response = await page.goto(`${APP_URL}${path}`);
    expect(response?.status(), path).toBe(200);
    await page.waitForLoadState("networkidle");
    const name = `pages-${who}${path.replace(inviteToken, "invitation").replace(/\d+/g, "n").replace(/\W+/g, "-")}`;
    violations.push(...(await shootAndCheck(page, name)).map((v) => `${path} ${v}`));
  }
  await page.close();
  return violations;
}

describe("every page", () => {
  it("an administrator's pages", async () => {
    const paths = ["/", "/jobs/new", `/jobs/${jobId}`, `/jobs/${jobId}/run`, `/jobs/${jobId}/edit`, `/jobs/${jobId}/audit`, "/customers", "/customers/new", `/customers/${customerId}/edit`, "/admin/users", "/admin/audit", "/settings/tokens", "/api-reference"];
    expect(await sweep("admin", admin.email, paths)).toEqual([]);
  }, 300_000);

  it("a customer user's pages", async () => {
    expect(await sweep("customer", customerUser.email, ["/", `/jobs/${jobId}`, `/jobs/${jobId}/run`, "/settings/tokens"])).toEqual([]);
  }, 120_000);

  it("the pages before signing in: sign-in and setting a password from an invitation", async () => {
    expect(await sweep("anonymous", null, ["/sign-in", `/set-password/${inviteToken}`])).toEqual([]);
  }, 120_000);
});
