// The running app over plain HTTP: protected pages redirect, the sign-in endpoint answers a wrong password and an
// unknown e-mail identically, and a set-password link works once.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { createInvite } from "../../lib/users/invites";
import { createUser } from "../db/fixtures";
import { APP_URL, requireRunningApp } from "./browser";

beforeAll(requireRunningApp);
afterAll(closeDb);

async function credentialsPost(email: string, password: string) {
  const csrfResponse = await fetch(`${APP_URL}/api/auth/csrf`);
  const { csrfToken } = (await csrfResponse.json()) as { csrfToken: string };
  const cookie = csrfResponse.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
  const response = await fetch(`${APP_URL}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie },
    body: new URLSearchParams({ email, password, csrfToken, json: "true" }),
  });
  const location = response.headers.get("location") ?? (((await response.json().catch(() => ({}))) as { url?: string }).url ?? "");
  return { status: response.status, error: new URL(location, APP_URL).searchParams.get("error"), session: response.headers.getSetCookie().some((c) => c.includes("session-token")) };
}

describe("over HTTP", () => {
  it("redirects pages to sign-in without a session", async () => {
    for (const path of ["/", "/admin/users"]) {
      const response = await fetch(`${APP_URL}${path}`, { redirect: "manual" });
      expect([303, 307, 308], path).toContain(response.status);
      expect(response.headers.get("location"), path).toContain("/sign-in");
    }
  });

  it("answers a wrong password and an unknown e-mail identically, and signs in with the right one", async () => {
    const user = await createUser({ role: "qa", password: "http password 1" });
    const wrong = await credentialsPost(user.email, "wrong");
    const unknown = await credentialsPost("nobody-http@tests.example", "http password 1");
    expect(wrong).toEqual(unknown);
    expect(wrong.session).toBe(false);
    const right = await credentialsPost(user.email, "http password 1");
    expect(right.session).toBe(true);
    expect(right.error).toBeNull();
  });

  it("serves a set-password link until it is used", async () => {
    const invitee = await createUser({ role: "reviewer" });
    const { token } = await db.transaction((tx) => createInvite(tx, invitee.id, null));
    const open = await (await fetch(`${APP_URL}/set-password/${token}`)).text();
    expect(open).toContain(`Welcome, ${invitee.name}`);
    const dead = await (await fetch(`${APP_URL}/set-password/not-a-real-token`)).text();
    expect(dead).toContain("This link no longer works");
  });
});
