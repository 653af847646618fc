// One-time, expiring set-password links. Only the sha256 of a token is stored; the token itself exists only in
// the e-mail, so a copy of the database cannot be used to take over an account.
import { createHash, randomBytes } from "node:crypto";
import { and, eq, gt, isNull } from "drizzle-orm";
import { z } from "zod";
import { db, type Tx } from "../../db/client";
import { userInvites, users } from "../../db/schema";
import { recordAudit } from "../audit";
import { AppError } from "../errors";
import { hashPassword, MIN_PASSWORD_LENGTH } from "../auth/password";

const ttlHours = z.coerce.number().positive().max(24 * 30).default(72).parse(process.env.INVITE_TTL_HOURS);
export const INVITE_TTL_MS = ttlHours * 60 * 60 * 1000;

export const tokenHash = (token: string) => createHash("sha256").update(token).digest("hex");

export const passwordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(200, "Use at most 200 characters.");

const invalidLink = () =>
  new AppError("invite_invalid", "This link has expired or was already used. Ask an administrator for a new one.", 410);

/** Creates an invite inside the caller's transaction; returns the token for the e-mail. */
export async function createInvite(tx: Tx, userId: number, createdBy: number | null, now = new Date()) {
  const token = randomBytes(32).toString("base64url");
  const expiresAt = new Date(now.getTime() + INVITE_TTL_MS);
  await tx.insert(userInvites).values({ userId, tokenSha256: tokenHash(token), createdBy, expiresAt });
  return { token, expiresAt };
}

/** The invited user for a token that is unused and not expired, or null. */
export async function findOpenInvite(token: string) {
  const [row] = await db
    .select({ inviteId: userInvites.id, userId: users.id, name: users.name, email: users.email, disabled: users.disabled })
    .from(userInvites)
    .innerJoin(users, eq(users.id, userInvites.userId))
    .where(and(eq(userInvites.tokenSha256, tokenHash(token)), isNull(userInvites.usedAt), gt(userInvites.expiresAt, new Date())))
    .limit(1);
  return row && !row.disabled ? row : null;
}

/** Sets the password and spends the token, atomically: a second use (even a simultaneous one) is refused. */
export async function acceptInvite(token: string, password: string): Promise<{ userId: number; email: string }> {
  const checked = passwordSchema.safeParse(password);
  if (!checked.success) throw new AppError("password_too_weak", checked.error.issues[0].message, 422);
  const invite = await findOpenInvite(token);
  if (!invite) throw invalidLink();
  const passwordHash = await hashPassword(password);
  await db.transaction(async (tx) => {
    const [spent] = await tx
      .update(userInvites)
      .set({ usedAt: new Date() })
      .where(and(eq(userInvites.id, invite.inviteId), isNull(userInvites.usedAt), gt(userInvites.expiresAt, new Date())));
    if (spent.affectedRows !== 1) throw invalidLink();
    await tx.update(users).set({ passwordHash }).where(eq(users.id, invite.userId));
    await recordAudit(tx, { actorId: invite.userId, action: "user.password_set", subjectType: "user", subjectId: invite.userId });
  });
  return { userId: invite.userId, email: invite.email };
}
