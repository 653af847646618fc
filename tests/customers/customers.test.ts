// Customers' data access: who may manage them, validation with a message per field, duplicates, the audit trail.
import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "../../db/client";
import { auditEvents } from "../../db/schema";
import { createCustomer, getCustomer, listCustomers, updateCustomer } from "../../lib/customers/customers";
import { AppError } from "../../lib/errors";
import { createUser, unique } from "../db/fixtures";

afterAll(closeDb);

async function refusal(promise: Promise<unknown>): Promise<AppError> {
  const error = await promise.then(() => null, (e: unknown) => e);
  expect(error).toBeInstanceOf(AppError);
  return error as AppError;
}

describe("customers", () => {
  it("prepress creates a customer with contact e-mails (trimmed, lower-cased, repeats dropped) and it is audited", async () => {
    const prepress = await createUser({ role: "prepress" });
    const name = unique("Ferncastle Biscuits");
    const made = await createCustomer(prepress, { name: `  ${name} `, contactEmails: "Quality@Ferncastle.example, buyer@ferncastle.example\nquality@ferncastle.example" });
    expect(made).toMatchObject({ name, contactEmails: ["quality@ferncastle.example", "buyer@ferncastle.example"] });
    const events = await db.select().from(auditEvents).where(and(eq(auditEvents.subjectType, "customer"), eq(auditEvents.subjectId, String(made.id))));
    expect(events.map((e) => [e.action, e.actorId])).toEqual([["customer.create", prepress.id]]);
  });

  it("refuses bad input with a message per field and stores nothing", async () => {
    const admin = await createUser({ role: "admin" });
    const error = await refusal(createCustomer(admin, { name: "  ", contactEmails: "someone@, ok@tests.example" }));
    expect(error.status).toBe(422);
    expect(error.fieldErrors?.name).toEqual(["Name is required."]);
    expect(Object.entries(error.fieldErrors ?? {}).some(([k, v]) => k.startsWith("contactEmails") && v[0].includes("“someone@” is not an e-mail address"))).toBe(true);
  });

  it("a second customer of the same name is a field error, on create and on rename", async () => {
    const admin = await createUser({ role: "admin" });
    const first = await createCustomer(admin, { name: unique("Hollin Dairy"), contactEmails: [] });
    const duplicate = await refusal(createCustomer(admin, { name: first.name, contactEmails: [] }));
    expect([duplicate.status, duplicate.fieldErrors?.name?.[0]]).toEqual([422, `A customer named “${first.name}” already exists.`]);
    const second = await createCustomer(admin, { name: unique("Hollin Creamery"), contactEmails: [] });
    const rename = await refusal(updateCustomer(admin, second.id, { name: first.name, contactEmails: [] }));
    expect(rename.fieldErrors?.name?.[0]).toContain("already exists");
    expect((await getCustomer(admin, second.id)).name).toBe(second.name);
  });

  it("edits a customer and records what changed", async () => {
    const prepress = await createUser({ role: "prepress" });
    const made = await createCustomer(prepress, { name: unique("Marrowby Foods"), contactEmails: ["old@marrowby.example"] });
    const edited = await updateCustomer(prepress, made.id, { name: made.name, contactEmails: "new@marrowby.example" });
    expect(edited.contactEmails).toEqual(["new@marrowby.example"]);
    const [event] = await db.select().from(auditEvents).where(and(eq(auditEvents.action, "customer.update"), eq(auditEvents.subjectId, String(made.id))));
    expect(event.details).toEqual({ contactEmails: { from: ["old@marrowby.example"], to: ["new@marrowby.example"] } });
  });

  it("QA, reviewers and customer users may not manage customers (403)", async () => {
    const own = await createCustomer(await createUser({ role: "admin" }), { name: unique("Pellow Mints"), contactEmails: [] });
    for (const actor of [await createUser({ role: "qa" }), await createUser({ role: "reviewer" }), await createUser({ role: "customer", customerId: own.id })]) {
      expect((await refusal(createCustomer(actor, { name: unique("Nope"), contactEmails: [] }))).status).toBe(403);
      expect((await refusal(listCustomers(actor, {}))).status).toBe(403);
      expect((await refusal(updateCustomer(actor, own.id, { name: own.name, contactEmails: [] }))).status).toBe(403);
    }
  });

  it("lists customers filtered by name, sorted and paginated on the server", async () => {
    const admin = await createUser({ role: "admin" });
    const tag = unique("Quillon");
    for (const n of ["c", "a", "b"]) await createCustomer(admin, { name: `${tag} ${n}`, contactEmails: [] });
    const first = await listCustomers(admin, { q: tag, sort: "name", dir: "desc", page: "1", pageSize: "5" });
    expect(first.total).toBe(3);
    expect(first.rows.map((r) => r.name)).toEqual([`${tag} c`, `${tag} b`, `${tag} a`]);
    const paged = await listCustomers(admin, { q: tag, page: 2, pageSize: 5 });
    expect([paged.total, paged.rows.length]).toEqual([3, 0]);
    // Nonsense in the URL falls back to the defaults rather than failing the page.
    const odd = await listCustomers(admin, { q: tag, sort: "colour", dir: "sideways", page: "-4" });
    expect([odd.page, odd.rows[0].name]).toEqual([1, `${tag} a`]);
  });
});
