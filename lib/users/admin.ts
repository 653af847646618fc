// User administration: list, invite, change role, disable/enable. Every function checks the policy itself and
// writes its audit event in the same transaction as the change.
import { and, asc, eq, isNull, gt, sql } from "drizzle-orm";
import { z } from "zod";
import { db } from "../../db/client";
import { customers, userInvites, users } from "../../db/schema";
import { recordAudit } from "../audit";
import { authorize, ROLES, type Actor, type Role } from "../auth/policy";
import { normaliseEmail } from "../auth/credentials";
import { AppError, notFound } from "../errors";
import { createInvite } from "./invites";
import { sendInviteMail } from "./invite-mail";

const roleSchema = z.enum(ROLES as [Role, ...Role[]]);
const optionalId = z.preprocess((v) => (v === "" || v === undefined || v === null ? null : v), z.coerce.number().int().positive().nullable());

/** A role with the customer it needs: customer users must name one, staff must not. */
export const roleAssignmentSchema = z
  .object({ role: roleSchema, customerId: optionalId })
  .refine((v) => (v.role === "customer") === (v.customerId !== null), {
    message: "Customer users need a customer; other roles must not have one.",
    path: ["customerId"],
  });

export const inviteSchema = z
  .object({
    email: z.string().trim().toLowerCase().pipe(z.email("Enter an e-mail address such as name@example.com.")),
    name: z.string().trim().min(1, "Enter the person's name.").max(200),
    role: roleSchema,
    customerId: optionalId,
  })
  .refine((v) => (v.role === "customer") === (v.customerId !== null), {
    message: "Customer users need a customer; other roles must not have one.",
    path: ["customerId"],
  });

export interface UserListItem {
  id: number;
  email: string;
  name: string;
  role: Role;
  customerId: number | null;
  customerName: string | null;
  disabled: boolean;
  /** True until the user has chosen a password. */
  invited: boolean;
  inviteOpen: boolean;
  lastSignInAt: Date | null;
}

export async function listUsers(actor: Actor): Promise<UserListItem[]> {
  authorize(actor, "user.manage");
  const inviteOpen = sql<number>`exists(select 1 from ${userInvites} where ${userInvites.userId} = ${users.id}
    and ${userInvites.usedAt} is null and ${userInvites.expiresAt} > ${new Date()})`.mapWith(Number);
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      role: users.role,
      customerId: users.customerId,
      customerName: customers.name,
      disabled: users.disabled,
      passwordHash: users.passwordHash,
      inviteOpen,
      lastSignInAt: users.lastSignInAt,
    })
    .from(users)
    .leftJoin(customers, eq(customers.id, users.customerId))
    .orderBy(asc(users.name));
  return rows.map(({ passwordHash, inviteOpen: open, ...row }) => ({ ...row, invited: !passwordHash, inviteOpen: open === 1 }));
}

export async function listCustomers(): Promise<{ id: number; name: string }[]> {
  return db.select({ id: customers.id, name: customers.name }).from(customers).orderBy(asc(customers.name));
}

async function requireCustomer(customerId: number | null) {
  if (customerId === null) return;
  const [found] = await db.select({ id: customers.id }).from(customers).where(eq(customers.id, customerId));
  if (!found) throw notFound("That customer");
}

/** Creates the account without a password and e-mails a one-time link. A failed e-mail leaves nothing behind. */
export async function inviteUser(actor: Actor, input: z.input<typeof inviteSchema>) {
  authorize(actor, "user.manage");
  const data = inviteSchema.parse(input);
  await requireCustomer(data.customerId);
  const email = normaliseEmail(data.email);
  const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  if (existing) throw new AppError("email_taken", `There is already an account for ${email}.`, 409);
  return db.transaction(async (tx) => {
    const [created] = await tx
      .insert(users)
      .values({ email, name: data.name, role: data.role, customerId: data.customerId })
      .$returningId();
    const { token, expiresAt } = await createInvite(tx, created.id, actor.id);
    await recordAudit(tx, {
      actorId: actor.id,
      action: "user.invite",
      subjectType: "user",
      subjectId: created.id,
      details: { email, role: data.role, customerId: data.customerId, expiresAt: expiresAt.toISOString() },
    });
    try {
      await sendInviteMail({ name: data.name, email }, data.role, token, expiresAt);
    } catch (error) {
      console.error("Sending the invitation failed:", error);
      throw new AppError("mail_failed", "The invitation e-mail could not be sent, so no account was created. Please try again.", 502);
    }
    return { userId: created.id, expiresAt };
  });
}

/** A new link for someone who has not chosen a password yet (the old links stop working). */
export async function resendInvite(actor: Actor, userId: number) {
  authorize(actor, "user.manage");
  const [user] = await db.select().from(users).where(eq(users.id, userId));
  if (!user) throw notFound("That user");
  if (user.passwordHash) throw new AppError("already_active", "This user has already chosen a password.", 409);
  return db.transaction(async (tx) => {
    await tx
      .update(userInvites)
      .set({ usedAt: new Date() })
      .where(and(eq(userInvites.userId, userId), isNull(userInvites.usedAt), gt(userInvites.expiresAt, new Date())));
    const { token, expiresAt } = await createInvite(tx, userId, actor.id);
    await recordAudit(tx, { actorId: actor.id, action: "user.invite_resend", subjectType: "user", subjectId: userId });
    await sendInviteMail(user, user.role, token, expiresAt).catch(() => {
      throw new AppError("mail_failed", "The invitation e-mail could not be sent. Please try again.", 502);
    });
    return { expiresAt };
  });
}

export async function changeRole(actor: Actor, userId: number, input: z.input<typeof roleAssignmentSchema>) {
  authorize(actor, "user.manage");
  const data = roleAssignmentSchema.parse(input);
  if (userId === actor.id) throw new AppError("own_account", "You cannot change your own role; ask another administrator.", 409);
  await requireCustomer(data.customerId);
  await db.transaction(async (tx) => {
    const [before] = await tx.select().from(users).where(eq(users.id, userId)).for("update");
    if (!before) throw notFound("That user");
    await tx.update(users).set({ role: data.role, customerId: data.customerId }).where(eq(users.id, userId));
    await recordAudit(tx, {
      actorId: actor.id,
      action: "user.role_change",
      subjectType: "user",
      subjectId: userId,
      details: { from: { role: before.role, customerId: before.customerId }, to: data },
    });
  });
}

export async function setDisabled(actor: Actor, userId: number, disabled: boolean) {
  authorize(actor, "user.manage");
  if (userId === actor.id) throw new AppError("own_account", "You cannot disable your own account.", 409);
  await db.transaction(async (tx) => {
    const [before] = await tx.select({ id: users.id }).from(users).where(eq(users.id, userId)).for("update");
    if (!before) throw notFound("That user");
    await tx.update(users).set({ disabled }).where(eq(users.id, userId));
    await recordAudit(tx, { actorId: actor.id, action: disabled ? "user.disable" : "user.enable", subjectType: "user", subjectId: userId });
  });
}
