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

export const ACTIONS: readonly Action[] = [
  "job.read",
  "job.create",
  "job.update",
  "customer.manage",
  "artwork.upload",
  "artwork.approve",
  "scan.upload",
  "inspection.read",
  "inspection.retry",
  "finding.decide",
  "sheet.signoff",
  "sheet.reopen",
  "user.manage",
  "settings.manage",
  "audit.read",
  "api_token.manage",
];

/** What each staff role may do. Admin may do everything; customers are handled apart (their own jobs only). */
const staffGrants: Record<Exclude<Role, "admin" | "customer">, ReadonlySet<Action>> = {
  prepress: new Set(["job.read", "job.create", "job.update", "customer.manage", "artwork.upload", "artwork.approve", "inspection.read"]),
  qa: new Set(["job.read", "scan.upload", "inspection.read", "inspection.retry"]),
  reviewer: new Set(["job.read", "inspection.read", "finding.decide", "sheet.signoff"]),
};

const customerGrants: ReadonlySet<Action> = new Set(["job.read", "inspection.read"]);

/** Job-scoped resources carry the customer they belong to. */
export interface Resource {
  customerId: number;
}

/**
 * May `actor` do `action` (on `resource`)? For a customer user the resource is required and must belong to
 * their own customer: without one the answer is no, so a list must be filtered by customer instead.
 * Staff roles act on every customer's jobs.
 */
export function can(actor: Actor, action: Action, resource?: Resource): boolean {
  if (action === "api_token.manage") return true;
  switch (actor.role) {
    case "admin":
      return true;
    case "customer":
      return (
        customerGrants.has(action) &&
        actor.customerId !== null &&
        resource !== undefined &&
        resource.customerId === actor.customerId
      );
    case "prepress":
    case "qa":
    case "reviewer":
      return staffGrants[actor.role].has(action);
    default:
      return false;
  }
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
