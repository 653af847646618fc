// The one access policy of Tympan. Every page, server action, route handler and the worker ask `can`/`authorize`;
// nothing else decides who may do what. Pure and synchronous (no database, no "server-only") so tests, scripts
// and the worker import it too.
import { forbidden } from "../errors";

export type Role = "admin" | "prepress" | "qa" | "reviewer" | "customer";

export const ROLES: readonly Role[] = ["admin", "prepress", "qa", "reviewer", "customer"];

export interface Actor {
  id: number;
  role: Role;
  /** The brand owner a customer user belongs to; null for printer staff. */
  customerId: number | null;
  name: string;
  email: string;
}

export type Action =
  | "job.read"
  | "job.create"
  | "job.update"
  | "customer.manage"
  | "artwork.upload"
  | "artwork.approve"
  | "scan.upload"
  | "inspection.read"
  | "inspection.retry"
  | "finding.decide"
  | "sheet.signoff"
  | "sheet.reopen"
  | "user.manage"
  | "settings.manage"
  | "audit.read"
  /** Create and revoke one's own API tokens (every signed-in user; ownership is checked by lib/auth/tokens.ts). */
  | "api_token.manage";

/**
 * Whose data an action touches: "job" — one job's data (customer users only their own customer's jobs, so the
 * resource must be named); "plant" — the plant's own records (customers, users, settings, the whole audit trail);
 * "own" — the actor's own records (their API tokens; lib/auth/tokens.ts checks the ownership).
 */
export type Scope = "job" | "plant" | "own";

export interface Rule {
  roles: readonly Role[];
  scope: Scope;
}

/**
 * THE policy table: role × action × whose data. DEVELOPERS.md ("Who may do what") shows the same table and
 * tests/api/authorization-matrix.test.ts reads it from there and checks it equals this one, then calls every route
 * handler and server action against it.
 */
export const POLICY: Record<Action, Rule> = {
  "job.read": { roles: ["admin", "prepress", "qa", "reviewer", "customer"], scope: "job" },
  "job.create": { roles: ["admin", "prepress"], scope: "plant" },
  "job.update": { roles: ["admin", "prepress"], scope: "job" },
  "customer.manage": { roles: ["admin", "prepress"], scope: "plant" },
  "artwork.upload": { roles: ["admin", "prepress"], scope: "job" },
  "artwork.approve": { roles: ["admin", "prepress"], scope: "job" },
  "scan.upload": { roles: ["admin", "qa"], scope: "job" },
  "inspection.read": { roles: ["admin", "prepress", "qa", "reviewer", "customer"], scope: "job" },
  "inspection.retry": { roles: ["admin", "qa"], scope: "job" },
  "finding.decide": { roles: ["admin", "reviewer"], scope: "job" },
  "sheet.signoff": { roles: ["admin", "reviewer"], scope: "job" },
  "sheet.reopen": { roles: ["admin"], scope: "job" },
  "user.manage": { roles: ["admin"], scope: "plant" },
  "settings.manage": { roles: ["admin"], scope: "plant" },
  "audit.read": { roles: ["admin"], scope: "plant" },
  "api_token.manage": { roles: ["admin", "prepress", "qa", "reviewer", "customer"], scope: "own" },
};

export const ACTIONS = Object.keys(POLICY) as readonly Action[];

/** Job-scoped resources carry the customer they belong to. */
export interface Resource {
  customerId: number;
}

/**
 * May `actor` do `action` (on `resource`)? The role must be in the action's row of POLICY. For a customer user and
 * a job-scoped action the resource is required and must belong to their own customer: without one the answer is
 * no, so a list must be filtered by customer instead. Staff roles act on every customer's jobs.
 */
export function can(actor: Actor, action: Action, resource?: Resource): boolean {
  const rule = POLICY[action];
  if (!rule || !rule.roles.includes(actor.role)) return false;
  if (actor.role !== "customer" || rule.scope !== "job") return true;
  return actor.customerId !== null && resource !== undefined && resource.customerId === actor.customerId;
}

/** Like `can`, but throws the 403 AppError `forbidden()` instead of returning false. */
export function authorize(actor: Actor, action: Action, resource?: Resource): void {
  if (!can(actor, action, resource)) throw forbidden();
}

/** Customer users see one customer's jobs; staff see all. Used to filter lists before `can` checks rows. */
export function customerScope(actor: Actor): number | null | "all" {
  if (actor.role === "customer") return actor.customerId;
  return "all";
}

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Administrator",
  prepress: "Prepress",
  qa: "Quality assurance",
  reviewer: "Reviewer",
  customer: "Customer",
};
