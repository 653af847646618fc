// Failed sign-ins and refused tokens are limited per account and per address: over the allowance the answer is
// 429 with Retry-After, even with the right password or a good token from that address; failures are audited.
import "./support/small-limits";
import "../pipeline/support/test-env";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { auditEvents } from "@/db/schema";
import { verifyCredentials } from "@/lib/auth/credentials";
import { createUser, unique } from "../db/fixtures";
import { call, makePlant, type Handler, type Plant } from "../api/support";

const { GET: listJobs } = await import("@/app/api/v1/jobs/route");
const { POST: nextAuthPost } = await import("@/app/api/auth/[...nextauth]/route");
let plant: Plant;
beforeAll(async () => {
  plant = await makePlant();
});
afterAll(closeDb);

const address = () => `198.51.100.${Math.floor(Math.random() * 250) + 1}, 10.${Math.floor(Math.random() * 250)}.0.${Math.floor(Math.random() * 250)}`;

describe("rate limits", () => {
  it("blocks an account after 3 failed sign-ins, even with the right password, and answers 429 with Retry-After", async () => {
    const user = await createUser({ role: "qa", password: "rate limit password 1" });
    for (let i = 0; i < 3; i++) expect(await verifyCredentials({ email: user.email, password: "wrong" }, `192.0.2.${i + 1}`)).toBeNull();
    // The account is blocked whatever the address.
    expect(await verifyCredentials({ email: user.email, password: "rate limit password 1" }, "192.0.2.99")).toBeNull();
    const form = new URLSearchParams({ email: user.email, password: "rate limit password 1", csrfToken: "x" });
    const response = await call(nextAuthPost as unknown as Handler, {
      method: "POST",
      path: "/api/auth/callback/credentials",
      params: { nextauth: ["callback", "credentials"] } as never,
      headers: { "content-type": "application/x-www-form-urlencoded", "x-forwarded-for": "192.0.2.200" },
      body: form,
    });
    expect(response.status).toBe(429);
    expect(Number(response.headers.get("retry-after"))).toBeGreaterThan(0);
    expect((await response.json()).error.code).toBe("too_many_attempts");
    const audit = await db.select().from(auditEvents).where(eq(auditEvents.subjectId, String(user.id)));
    expect(audit.filter((a) => a.action === "user.sign_in_failed").length).toBeGreaterThanOrEqual(3);
  });

  it("blocks an address after 5 failed sign-ins across accounts; other addresses still sign in", async () => {
    const from = address();
    const user = await createUser({ role: "reviewer", password: "rate limit password 2" });
    for (let i = 0; i < 5; i++) await verifyCredentials({ email: `${unique("nobody")}@tests.example`, password: "x" }, from.split(",").at(-1)!.trim());
    expect(await verifyCredentials({ email: user.email, password: "rate limit password 2" }, from.split(",").at(-1)!.trim())).toBeNull();
    expect(await verifyCredentials({ email: user.email, password: "rate limit password 2" }, "203.0.113.7")).not.toBeNull();
  });

  it("answers 429 with Retry-After once an address has sent 5 bad tokens, even for a good token from there", async () => {
    const from = address();
    const bad = { authorization: `Bearer tym_${"B".repeat(43)}`, "x-forwarded-for": from };
    const statuses: number[] = [];
    for (let i = 0; i < 6; i++) statuses.push((await call(listJobs as Handler, { path: "/api/v1/jobs", headers: bad })).status);
    expect(statuses.slice(0, 4)).toEqual([401, 401, 401, 401]);
    expect(statuses.at(-1)).toBe(429);
    const good = await call(listJobs as Handler, { path: "/api/v1/jobs", headers: { authorization: `Bearer ${plant.tokens.admin}`, "x-forwarded-for": from } });
    expect(good.status).toBe(429);
    expect(Number(good.headers.get("retry-after"))).toBeGreaterThan(0);
    const elsewhere = await call(listJobs as Handler, { path: "/api/v1/jobs", headers: { authorization: `Bearer ${plant.tokens.admin}`, "x-forwarded-for": address() } });
    expect(elsewhere.status).toBe(200);
  });
});
