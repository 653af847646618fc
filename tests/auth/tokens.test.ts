// Personal API tokens: shown once, stored as sha256 only, acting with the user's current role, last use recorded,
// refused with 401 when revoked, expired or when the user is disabled; revoking is for the owner (or an admin).
import "../pipeline/support/test-env";
import { createHash } from "node:crypto";
import { execFileSync } from "node:child_process";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { apiTokens, auditEvents, users } from "@/db/schema";
import { checkApiToken, createApiToken, listApiTokens, revokeApiToken } from "@/lib/auth/tokens";
import { call, makePlant, type Handler, type Plant } from "../api/support";

const { GET: getJob } = await import("@/app/api/v1/jobs/[jobId]/route");
let plant: Plant;
beforeAll(async () => {
  plant = await makePlant();
});
afterAll(closeDb);

const asBearer = (token: string) => ({ authorization: `Bearer ${token}` });

describe("personal API tokens", () => {
  it("keeps only the sha256 of a token and records its last use and its use in the audit trail", async () => {
    const { id, token } = await createApiToken(plant.actors.qa.id, plant.actors.qa.id, "Scanner station, press 2");
    expect(token).toMatch(/^tym_[A-Za-z0-9_-]{43}$/);
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, id));
    expect(row.tokenSha256).toBe(createHash("sha256").update(token).digest("hex"));
    expect(JSON.stringify(row)).not.toContain(token.slice(4));
    expect(row.lastUsedAt).toBeNull();
    const response = await call(getJob as Handler, { path: `/api/v1/jobs/${plant.a.jobId}`, params: { jobId: String(plant.a.jobId) }, headers: asBearer(token) });
    expect(response.status).toBe(200);
    const [after] = await db.select().from(apiTokens).where(eq(apiTokens.id, id));
    expect(after.lastUsedAt).not.toBeNull();
    const audit = await db.select().from(auditEvents).where(eq(auditEvents.subjectId, String(id)));
    expect(audit.map((a) => a.action)).toEqual(expect.arrayContaining(["api_token.create", "api_token.use"]));
  });

  it("twenty requests arriving together with a fresh token record its use once, not twenty times", async () => {
    const { id, token } = await createApiToken(null, plant.actors.qa.id, "Scanner station, press 3");
    const checks = await Promise.all(Array.from({ length: 20 }, () => checkApiToken(token)));
    expect(checks.every((c) => c.ok)).toBe(true);
    const uses = (await db.select().from(auditEvents).where(eq(auditEvents.subjectId, String(id)))).filter((a) => a.action === "api_token.use");
    expect(uses).toHaveLength(1);
  });

  it("acts with the user's current role and stops working when the user is disabled", async () => {
    const { token } = await createApiToken(null, plant.actors.reviewer.id, "reviewer");
    const ok = await checkApiToken(token);
    expect(ok.ok && ok.actor.role).toBe("reviewer");
    await db.update(users).set({ role: "qa" }).where(eq(users.id, plant.actors.reviewer.id));
    const changed = await checkApiToken(token);
    expect(changed.ok && changed.actor.role).toBe("qa");
    await db.update(users).set({ disabled: true }).where(eq(users.id, plant.actors.reviewer.id));
    expect(await checkApiToken(token)).toMatchObject({ ok: false, reason: "user_disabled" });
    const response = await call(getJob as Handler, { path: `/api/v1/jobs/${plant.a.jobId}`, params: { jobId: String(plant.a.jobId) }, headers: asBearer(token) });
    expect(response.status).toBe(401);
    expect((await response.json()).error.code).toBe("invalid_token");
    await db.update(users).set({ role: "reviewer", disabled: false }).where(eq(users.id, plant.actors.reviewer.id));
  });

  it("refuses revoked, expired, unknown and malformed tokens with 401, and an expiry in the past", async () => {
    for (const header of [asBearer(plant.revokedToken), asBearer(plant.expiredToken), asBearer(`tym_${"A".repeat(43)}`), asBearer("nonsense"), { authorization: "Basic dXNlcjpwYXNz" }]) {
      const response = await call(getJob as Handler, { path: `/api/v1/jobs/${plant.a.jobId}`, params: { jobId: String(plant.a.jobId) }, headers: header });
      expect(response.status, header.authorization).toBe(401);
      expect(await response.text()).not.toContain("Kettlewick");
    }
    await expect(createApiToken(null, plant.actors.qa.id, "past", new Date(Date.now() - 1000))).rejects.toMatchObject({ status: 422 });
  });

  it("lets only the owner (or an administrator) revoke a token", async () => {
    const { id, token } = await createApiToken(null, plant.actors.prepress.id, "prepress");
    await expect(revokeApiToken(plant.actors.qa, id)).rejects.toMatchObject({ status: 404 });
    expect((await checkApiToken(token)).ok).toBe(true);
    await revokeApiToken(plant.actors.prepress, id);
    expect(await checkApiToken(token)).toMatchObject({ ok: false, reason: "revoked" });
    const listed = await listApiTokens(plant.actors.prepress.id);
    expect(listed.find((t) => t.id === id)?.revokedAt).not.toBeNull();
  });

  it("npm run api-token prints a working token for an existing user, and refuses an unknown one", () => {
    const out = execFileSync("node_modules/.bin/tsx", ["scripts/api-token.ts", "--email", plant.actors.qa.email, "--name", "Station 3"], { encoding: "utf8", stdio: ["ignore", "pipe", "pipe"] });
    expect(out.trim()).toMatch(/^tym_[A-Za-z0-9_-]{43}$/);
    expect(() => execFileSync("node_modules/.bin/tsx", ["scripts/api-token.ts", "--email", "nobody@nowhere.example"], { stdio: "ignore" })).toThrow();
  });
});
