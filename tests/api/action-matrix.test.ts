// The authorization matrix of the server actions: every export of every "use server" file under app/ and lib/
// called as anonymous, as a disabled user, as each role and as a customer user of another customer, each answer
// checked against the policy table of DEVELOPERS.md. Actions take the session cookie only (a browser posts them),
// so the token callers of tests/api/authorization-matrix.test.ts do not apply. The session is stood in for by the
// signed-in user's id; the user is re-read from the database exactly as lib/auth/session.ts does (a disabled
// account is nobody). An action missing from ACTIONS fails the guard test at the end.
import "../pipeline/support/test-env";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { closeDb } from "@/db/client";
import type { ActionState } from "@/lib/auth/action";
import type { Action, Actor, Role } from "@/lib/auth/policy";
import { createApiToken } from "@/lib/auth/tokens";
import { answerMatches, expectedAnswer, type Caller } from "./policy-table";
import { makePlant, type Plant, type PlantJob } from "./support";
import { createUser } from "../db/fixtures";

const session = vi.hoisted(() => ({ userId: null as number | null }));
vi.mock("server-only", () => ({}));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined, revalidateTag: () => undefined }));
vi.mock("next/navigation", () => ({
  redirect: (to: string) => {
    throw Object.assign(new Error("NEXT_REDIRECT"), { redirectTo: to });
  },
}));
vi.mock("@/lib/auth/session", async () => {
  const { loadActor } = await import("@/lib/auth/credentials");
  const { notSignedIn } = await import("@/lib/errors");
  const getActor = async () => (session.userId === null ? null : loadActor(session.userId));
  return {
    getActor,
    requireActor: async () => (await getActor()) ?? Promise.reject(new Error("redirect to sign-in")),
    actorOrThrow: async () => (await getActor()) ?? Promise.reject(notSignedIn()),
  };
});

type ServerAction = (previous: ActionState, form: FormData) => Promise<ActionState>;

interface ActionCase {
  /** The "use server" file, from the repository root, and the exported action. */
  file: string;
  name: string;
  action: Action;
  scope: "job" | "plant";
  /** Refuses a role that never has the action before it reads the form (so another customer's job is a 403). */
  roleFirst?: boolean;
  form: (job: PlantJob, caller: Actor | null) => Promise<Record<string, string>>;
}

const unique = () => Math.random().toString(36).slice(2, 10);
const jobForm = (job: PlantJob) => ({ customerId: String(job.customerId), title: "Herbal tea 20 bags, folding carton", upsRows: "2", upsColumns: "3" });
const someone = async () => String((await createUser({ role: "qa" })).id);

const ACTIONS: ActionCase[] = [
  { file: "app/(workspace)/admin/users/actions.ts", name: "inviteAction", action: "user.manage", scope: "plant", form: async () => ({ email: `invitee-${unique()}@matrix.example`, name: "Wren Invitee", role: "qa", customerId: "" }) },
  { file: "app/(workspace)/admin/users/actions.ts", name: "changeRoleAction", action: "user.manage", scope: "plant", form: async () => ({ userId: await someone(), role: "reviewer", customerId: "" }) },
  { file: "app/(workspace)/admin/users/actions.ts", name: "setDisabledAction", action: "user.manage", scope: "plant", form: async () => ({ userId: await someone(), disabled: "true" }) },
  { file: "app/(workspace)/admin/users/actions.ts", name: "resendInviteAction", action: "user.manage", scope: "plant", form: async () => ({ userId: await someone() }) },
  { file: "app/(workspace)/customers/actions.ts", name: "createCustomerAction", action: "customer.manage", scope: "plant", form: async () => ({ name: `Matrix Mints ${unique()}`, contactEmails: "" }) },
  { file: "app/(workspace)/customers/actions.ts", name: "updateCustomerAction", action: "customer.manage", scope: "plant", form: async (j) => ({ customerId: String(j.customerId), name: j.customerName, contactEmails: "" }) },
  { file: "app/(workspace)/jobs/actions.ts", name: "createJobAction", action: "job.create", scope: "plant", form: async (j) => ({ ...jobForm(j), jobNumber: `MXA-${unique()}` }) },
  { file: "app/(workspace)/jobs/actions.ts", name: "updateJobAction", action: "job.update", scope: "job", roleFirst: true, form: async (j) => ({ ...jobForm(j), jobId: String(j.jobId), jobNumber: j.jobNumber }) },
  { file: "app/(workspace)/settings/tokens/actions.ts", name: "createTokenAction", action: "api_token.manage", scope: "plant", form: async () => ({ name: "Scanner station, press 4", expiresInDays: "30" }) },
  {
    file: "app/(workspace)/settings/tokens/actions.ts",
    name: "revokeTokenAction",
    action: "api_token.manage",
    scope: "plant",
    // One's own token (another's is tested below).
    form: async (_j, caller) => ({ tokenId: String((await createApiToken(null, caller?.id ?? (await createUser({ role: "qa" })).id, "to revoke")).id) }),
  },
];

/** Actions that answer everybody on purpose, with the reason. */
const PUBLIC_ACTIONS: Record<string, string> = {
  "app/set-password/[token]/actions.ts setPasswordAction": "the one-time set-password link is the credential; checked and spent in one transaction (tests/admin)",
};

const ROOT = path.resolve(import.meta.dirname, "../..");
const actionModules = import.meta.glob<Record<string, unknown>>(["../../app/**/*.ts", "../../lib/**/*.ts", "!../../lib/imaging/**"]);
const moduleOf = (file: string) => actionModules[`../../${file}`]();

interface ActingCaller extends Caller {
  actor: Actor | null;
}

let plant: Plant;
let callers: ActingCaller[];

beforeAll(async () => {
  plant = await makePlant();
  callers = [
    { name: "anonymous", role: null, customerId: null, actor: null },
    { name: "disabled user", role: null, customerId: null, actor: plant.disabled },
    { name: "customer of another customer", role: "customer", customerId: plant.b.customerId, actor: plant.otherCustomer },
    ...(Object.keys(plant.actors) as Role[]).map((role) => ({ name: role, role, customerId: plant.actors[role].customerId, actor: plant.actors[role] })),
  ];
});
afterAll(closeDb);

async function run(file: string, name: string, caller: Actor | null, fields: Record<string, string>): Promise<ActionState & { redirectTo?: string }> {
  const action = (await moduleOf(file))[name] as ServerAction;
  const form = new FormData();
  for (const [key, value] of Object.entries(fields)) form.append(key, value);
  session.userId = caller?.id ?? null;
  try {
    return await action({}, form);
  } catch (error) {
    const redirectTo = (error as { redirectTo?: string }).redirectTo;
    if (redirectTo) return { redirectTo };
    throw error;
  } finally {
    session.userId = null;
  }
}

const statusOf = (code: string | undefined) => (code === "not_signed_in" ? 401 : code === "forbidden" ? 403 : code === "not_found" ? 404 : 200);

describe("authorization matrix: server actions", () => {
  it("answers every server action for every caller as the table says", async () => {
    const mismatches: string[] = [];
    for (const c of ACTIONS) {
      for (const caller of callers) {
        const want = expectedAnswer(caller, c.action, c.scope, plant.a.customerId, c.roleFirst);
        const state = await run(c.file, c.name, caller.actor, await c.form(plant.a, caller.actor));
        if (!answerMatches(want, statusOf(state.code), state.code)) mismatches.push(`${c.name} as ${caller.name}: expected ${want}, got ${JSON.stringify(state).slice(0, 160)}`);
        // The forms are valid, so an administrator's answer is a real success (not a field error passing as "allowed").
        if (caller.name === "admin" && state.error) mismatches.push(`${c.name} as admin: ${state.error} ${JSON.stringify(state.fieldErrors ?? {})}`);
        // A refusal echoes only what the caller typed (values), nothing of the job.
        if (want !== "allowed") expect(JSON.stringify({ ...state, values: undefined }), `${c.name} as ${caller.name}`).not.toContain(plant.a.customerName);
      }
    }
    expect(mismatches).toEqual([]);
  });

  it("a signed-in user may not revoke another user's token (404); an administrator may", async () => {
    const victim = await createApiToken(null, plant.actors.reviewer.id, "press 2");
    const file = "app/(workspace)/settings/tokens/actions.ts";
    expect((await run(file, "revokeTokenAction", plant.actors.qa, { tokenId: String(victim.id) })).code).toBe("not_found");
    expect((await run(file, "revokeTokenAction", plant.actors.admin, { tokenId: String(victim.id) })).ok).toMatch(/revoked/);
  });

  it("guard: every export of every \"use server\" file is in ACTIONS or PUBLIC_ACTIONS", async () => {
    const files: string[] = [];
    const walk = (dir: string) => {
      for (const entry of readdirSync(path.join(ROOT, dir), { withFileTypes: true })) {
        const rel = `${dir}/${entry.name}`;
        if (entry.isDirectory()) walk(rel);
        else if (/\.tsx?$/.test(entry.name) && /["']use server["']/.test(readFileSync(path.join(ROOT, rel), "utf8"))) files.push(rel);
      }
    };
    walk("app");
    walk("lib");
    expect(files.length).toBeGreaterThanOrEqual(5);
    const covered = new Set([...ACTIONS.map((c) => `${c.file} ${c.name}`), ...Object.keys(PUBLIC_ACTIONS)]);
    const missing: string[] = [];
    for (const file of files) {
      // An action declared inside a page or component would escape this list: keep actions in their own files.
      if (!/^\s*(\/\/[^\n]*\n\s*)*["']use server["']/.test(readFileSync(path.join(ROOT, file), "utf8"))) {
        missing.push(`${file}: an inline "use server" (move the action to a "use server" file)`);
        continue;
      }
      for (const [name, value] of Object.entries(await moduleOf(file))) {
        if (typeof value === "function" && !covered.has(`${file} ${name}`)) missing.push(`${file} ${name}`);
      }
    }
    expect(missing, "server actions missing from the authorization matrix").toEqual([]);
  });
});
