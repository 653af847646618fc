// The policy table as DEVELOPERS.md writes it ("Who may do what"), and what the matrix tests expect of each caller
// from it. The docs are read, not copied, so the written table, lib/auth/policy.ts and the handlers cannot drift
// apart unnoticed.
import { readFileSync } from "node:fs";
import path from "node:path";
import { ROLES, type Action, type Role, type Rule, type Scope } from "@/lib/auth/policy";

const DOCS = path.resolve(import.meta.dirname, "../../DEVELOPERS.md");

/** Rows of the table under "## Who may do what": `action` | ✓/– per role | whose data | used by. */
export function policyTableFromDocs(): Record<string, Rule> {
  const text = readFileSync(DOCS, "utf8");
  const section = text.slice(text.indexOf("## Who may do what"), text.indexOf("\n## ", text.indexOf("## Who may do what") + 3));
  const lines = section.split("\n").filter((line) => line.startsWith("|"));
  const header = lines[0].split("|").map((cell) => cell.trim());
  const table: Record<string, Rule> = {};
  for (const line of lines) {
    const cells = line.split("|").map((cell) => cell.trim());
    const action = /^`([a-z_]+\.[a-z_]+)`$/.exec(cells[1])?.[1];
    if (!action) continue;
    const roles = ROLES.filter((role) => cells[header.indexOf(role)] === "✓");
    table[action] = { roles, scope: cells[header.indexOf("whose data")] as Scope };
  }
  return table;
}

export const TABLE = policyTableFromDocs();

/** Who calls: a role (with a customer for customer users), or nobody the app accepts (role null). */
export interface Caller {
  name: string;
  role: Role | null;
  customerId: number | null;
}

export type Expected = "allowed" | 401 | 403 | 404;

/**
 * What the table says `caller` gets for `action`. `scope` is how the request names its data: "job" (one job of the
 * customer `jobCustomerId`), "plant" (no job) or "list" (every signed-in caller gets a list filtered to what they
 * may read). `roleFirst`: the handler refuses a role that never has the action before looking anything up.
 */
export function expectedAnswer(
  caller: Caller,
  action: Action,
  scope: "job" | "plant" | "list",
  jobCustomerId: number,
  roleFirst = false,
): Expected {
  if (caller.role === null) return 401;
  if (scope === "list") return "allowed";
  const granted = TABLE[action].roles.includes(caller.role);
  const othersJob = scope === "job" && caller.role === "customer" && caller.customerId !== jobCustomerId;
  if (othersJob && (granted || !roleFirst)) return 404;
  return granted ? "allowed" : 403;
}

/** The error codes a refusal may carry, by status. */
const REFUSALS: Record<401 | 403 | 404, readonly string[]> = {
  401: ["not_signed_in", "invalid_token"],
  403: ["forbidden"],
  404: ["not_found"],
};
const ALL_REFUSALS = new Set([...Object.values(REFUSALS).flat(), "cross_origin"]);

/** Does an answer (status and error code, if any) match what was expected? */
export function answerMatches(want: Expected, status: number, code: string | undefined): boolean {
  if (want === "allowed") return status < 500 && !(code && ALL_REFUSALS.has(code));
  return status === want && code !== undefined && REFUSALS[want].includes(code);
}
