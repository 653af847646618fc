// Customers (brand owners) for the people who manage them: admin and prepress. Every function takes the actor,
// asks the policy, and writes its audit event in the same transaction as the change.
import { and, asc, desc, eq, like, ne, sql } from "drizzle-orm";
import { db } from "../../db/client";
import { customers, jobs } from "../../db/schema";
import { recordAudit } from "../audit";
import { authorize, can, type Actor } from "../auth/policy";
import { invalidInput, notFound } from "../errors";
import { isDuplicateKey, parseInput, type Page } from "../validation";
import { customerInput, customerListQuery } from "./schema";

export interface CustomerListItem {
  id: number;
  name: string;
  contactEmails: string[];
  jobCount: number;
  openJobCount: number;
  updatedAt: string;
}

export interface CustomerDetail {
  id: number;
  name: string;
  contactEmails: string[];
  createdAt: string;
  updatedAt: string;
}

const escapeLike = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`);

export async function listCustomers(actor: Actor, rawQuery: unknown): Promise<Page<CustomerListItem>> {
  authorize(actor, "customer.manage");
  const query = parseInput(customerListQuery, rawQuery);
  const where = query.q ? like(customers.name, `%${escapeLike(query.q)}%`) : undefined;
  const jobCount = sql<number>`(select count(*) from ${jobs} where ${jobs.customerId} = ${customers.id})`.mapWith(Number);
  const openJobCount = sql<number>`(select count(*) from ${jobs} where ${jobs.customerId} = ${customers.id}
    and ${jobs.status} in ('prepress', 'on_press'))`.mapWith(Number);
  const direction = query.dir === "desc" ? desc : asc;
  const order = { name: [direction(customers.name)], jobs: [direction(jobCount), asc(customers.name)], updated: [direction(customers.updatedAt), asc(customers.id)] }[query.sort];
  const [rows, [{ total }]] = await Promise.all([
    db
      .select({ id: customers.id, name: customers.name, contactEmails: customers.contactEmails, jobCount, openJobCount, updatedAt: customers.updatedAt })
      .from(customers)
      .where(where)
      .orderBy(...order)
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ total: sql<number>`count(*)`.mapWith(Number) }).from(customers).where(where),
  ]);
  return { rows: rows.map((r) => ({ ...r, updatedAt: r.updatedAt.toISOString() })), total, page: query.page, pageSize: query.pageSize };
}

/** Names and ids for the job form's customer field. */
export async function customerOptions(actor: Actor): Promise<{ id: number; name: string }[]> {
  if (!can(actor, "job.create") && !can(actor, "job.update")) authorize(actor, "customer.manage");
  return db.select({ id: customers.id, name: customers.name }).from(customers).orderBy(asc(customers.name));
}

export async function getCustomer(actor: Actor, customerId: number): Promise<CustomerDetail> {
  authorize(actor, "customer.manage");
  const [row] = await db.select().from(customers).where(eq(customers.id, customerId)).limit(1);
  if (!row) throw notFound("The customer");
  return { id: row.id, name: row.name, contactEmails: row.contactEmails, createdAt: row.createdAt.toISOString(), updatedAt: row.updatedAt.toISOString() };
}

const duplicateName = (name: string) => invalidInput({ name: [`A customer named “${name}” already exists.`] });

export async function createCustomer(actor: Actor, rawInput: unknown): Promise<CustomerDetail> {
  authorize(actor, "customer.manage");
  const input = parseInput(customerInput, rawInput);
  try {
    const id = await db.transaction(async (tx) => {
      const [{ id }] = await tx.insert(customers).values(input).$returningId();
      await recordAudit(tx, { actorId: actor.id, action: "customer.create", subjectType: "customer", subjectId: id, details: { ...input } });
      return id;
    });
    return getCustomer(actor, id);
  } catch (error) {
    if (isDuplicateKey(error)) throw duplicateName(input.name);
    throw error;
  }
}

export async function updateCustomer(actor: Actor, customerId: number, rawInput: unknown): Promise<CustomerDetail> {
  authorize(actor, "customer.manage");
  const input = parseInput(customerInput, rawInput);
  try {
    await db.transaction(async (tx) => {
      const [before] = await tx.select().from(customers).where(eq(customers.id, customerId)).for("update");
      if (!before) throw notFound("The customer");
      const [clash] = await tx
        .select({ id: customers.id })
        .from(customers)
        .where(and(eq(customers.name, input.name), ne(customers.id, customerId)))
        .limit(1);
      if (clash) throw duplicateName(input.name);
      await tx.update(customers).set(input).where(eq(customers.id, customerId));
      const changed: Record<string, unknown> = {};
      if (before.name !== input.name) changed.name = { from: before.name, to: input.name };
      if (JSON.stringify(before.contactEmails) !== JSON.stringify(input.contactEmails)) changed.contactEmails = { from: before.contactEmails, to: input.contactEmails };
      await recordAudit(tx, { actorId: actor.id, action: "customer.update", subjectType: "customer", subjectId: customerId, details: changed });
    });
  } catch (error) {
    if (isDuplicateKey(error)) throw duplicateName(input.name);
    throw error;
  }
  return getCustomer(actor, customerId);
}
