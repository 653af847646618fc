// Rows for tests, each with a unique name so test files never collide. Refuses to run against a database that
// is not a test database (npm test sets DATABASE_URL to .../tympan_test).
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { db } from "../../db/client";
import { customers, jobs, users } from "../../db/schema";
import { hashPassword } from "../../lib/auth/password";
import type { Actor, Role } from "../../lib/auth/policy";
import { env } from "../../lib/env";

const databaseName = new URL(env.DATABASE_URL).pathname.slice(1);
if (!databaseName.includes("test")) {
  throw new Error(`Tests refuse to run against "${databaseName}". Run them with npm test (it uses tympan_test).`);
}

export const unique = (prefix: string) => `${prefix}-${randomUUID().slice(0, 8)}`;

export async function createCustomer(name = unique("Customer")) {
  const [row] = await db.insert(customers).values({ name }).$returningId();
  return { id: row.id, name };
}

export async function createUser(options: { role: Role; customerId?: number | null; password?: string; disabled?: boolean }) {
  const email = `${unique(options.role)}@tests.example`;
  const passwordHash = options.password ? await hashPassword(options.password) : null;
  const name = unique("Person");
  const [row] = await db
    .insert(users)
    .values({ email, name, role: options.role, customerId: options.customerId ?? null, passwordHash, disabled: options.disabled ?? false })
    .$returningId();
  const actor: Actor = { id: row.id, role: options.role, customerId: options.customerId ?? null, name, email };
  return actor;
}

export async function createJob(customerId: number, jobNumber = unique("T")) {
  const [row] = await db.insert(jobs).values({ customerId, jobNumber, title: `Carton ${jobNumber}` }).$returningId();
  return { id: row.id, jobNumber, customerId };
}

export async function userRow(id: number) {
  const [row] = await db.select().from(users).where(eq(users.id, id));
  return row;
}
