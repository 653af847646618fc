// The demo seed can run again without duplicating anything, and its accounts sign in with the documented password.
import { count, inArray } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { customers, jobs, toleranceProfiles, users } from "../../db/schema";
import { DEMO_CUSTOMERS, DEMO_PASSWORD, DEMO_USERS, seedDemo } from "../../db/seed";
import { verifyCredentials } from "../../lib/auth/credentials";
import { listJobsForActor } from "../../lib/jobs/queries";
import "./fixtures";

afterAll(closeDb);

const totals = async () => ({
  customers: (await db.select({ n: count() }).from(customers).where(inArray(customers.name, [...DEMO_CUSTOMERS])))[0].n,
  users: (await db.select({ n: count() }).from(users).where(inArray(users.email, DEMO_USERS.map((u) => u.email))))[0].n,
  jobs: (await db.select({ n: count() }).from(jobs))[0].n,
  profiles: (await db.select({ n: count() }).from(toleranceProfiles))[0].n,
});

describe("demo seed", () => {
  it("is idempotent", async () => {
    await seedDemo();
    const first = await totals();
    await seedDemo();
    expect(await totals()).toEqual(first);
    expect(first.customers).toBe(DEMO_CUSTOMERS.length);
    expect(first.users).toBe(DEMO_USERS.length);
    expect(first.profiles).toBeGreaterThanOrEqual(2);
  });

  it("creates one account per role that signs in with the demo password, customers scoped to their company", async () => {
    const roles = new Set<string>();
    for (const u of DEMO_USERS) {
      const actor = await verifyCredentials({ email: u.email, password: DEMO_PASSWORD });
      expect(actor, u.email).toMatchObject({ role: u.role });
      roles.add(u.role);
      if (u.role === "customer") {
        const seen = await listJobsForActor(actor!);
        expect(seen.length).toBeGreaterThan(0);
        expect(seen.every((job) => job.customerName === u.customer)).toBe(true);
      }
    }
    expect([...roles].sort()).toEqual(["admin", "customer", "prepress", "qa", "reviewer"]);
  });
});
