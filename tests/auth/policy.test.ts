// The access policy, role by role and action by action. The expected table is the product's role definition
// (admin: everything; prepress: jobs and artwork; QA: scans and retries; reviewer: decisions and sign-off;
// customer: read their own customer's jobs and inspections only).
import { describe, expect, it } from "vitest";
import { ROLES as SCHEMA_ROLES } from "../../db/schema";
import { forbidden } from "../../lib/errors";
import { ACTIONS, authorize, can, ROLES, type Action, type Actor, type Role } from "../../lib/auth/policy";

const allowed: Record<Exclude<Role, "customer">, Action[]> = {
  admin: [...ACTIONS],
  prepress: ["job.read", "job.create", "job.update", "customer.manage", "artwork.upload", "artwork.approve", "inspection.read", "api_token.manage"],
  qa: ["job.read", "scan.upload", "inspection.read", "inspection.retry", "api_token.manage"],
  reviewer: ["job.read", "inspection.read", "finding.decide", "sheet.signoff", "api_token.manage"],
};
// Managing one's own API tokens is self-service for every role, whoever's job is named.
const customerReads: Action[] = ["job.read", "inspection.read", "api_token.manage"];

const actor = (role: Role, customerId: number | null = null): Actor => ({ id: 1, role, customerId, name: "T", email: "t@tests.example" });
const own = { customerId: 7 };
const other = { customerId: 8 };

describe("policy", () => {
  it("knows the same roles as the database", () => {
    expect([...ROLES]).toEqual([...SCHEMA_ROLES]);
  });

  for (const role of ["admin", "prepress", "qa", "reviewer"] as const) {
    describe(role, () => {
      for (const action of ACTIONS) {
        const expected = allowed[role].includes(action);
        it(`${expected ? "may" : "may not"} ${action}, on any customer's job`, () => {
          expect(can(actor(role), action)).toBe(expected);
          expect(can(actor(role), action, own)).toBe(expected);
          expect(can(actor(role), action, other)).toBe(expected);
        });
      }
    });
  }

  describe("customer", () => {
    const customer = actor("customer", 7);
    for (const action of ACTIONS) {
      const readable = customerReads.includes(action);
      it(`${readable ? "may" : "may not"} ${action} on their own customer's job`, () => {
        expect(can(customer, action, own)).toBe(readable);
      });
      if (action !== "api_token.manage") {
        it(`may not ${action} on another customer's job`, () => {
          expect(can(customer, action, other)).toBe(false);
        });
      }
    }
    it("may not read anything without naming the job's customer", () => {
      expect(can(customer, "job.read")).toBe(false);
    });
    it("without a customer of their own may read nothing", () => {
      expect(can(actor("customer", null), "job.read", own)).toBe(false);
    });
  });

  it("authorize throws the 403 forbidden error and passes silently when allowed", () => {
    expect(() => authorize(actor("qa"), "sheet.signoff")).toThrow(forbidden().message);
    expect(() => authorize(actor("customer", 7), "job.read", other)).toThrowError(expect.objectContaining({ status: 403, code: "forbidden" }));
    expect(() => authorize(actor("reviewer"), "sheet.signoff")).not.toThrow();
  });
});
