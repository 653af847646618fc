// Checks an e-mail and password against the users table. No "server-only": tests call it directly.
// A wrong password, an unknown e-mail, a disabled account and an account without a password all fail alike,
// so the sign-in form cannot be used to find out which addresses exist.
import { eq } from "drizzle-orm";
import { z } from "zod";
import { db } from "../../db/client";
import { users } from "../../db/schema";
import { recordAudit } from "../audit";
import type { Actor } from "./policy";
import { decoy, verifyPassword } from "./password";
import { forgiveAccount, recordFailure, retryAfter } from "./rate-limit";

export const SIGN_IN_FAILED_MESSAGE = "That e-mail and password do not match an active account.";

export const credentialsSchema = z.object({
  email: z.string().trim().toLowerCase().pipe(z.email()),
  password: z.string().min(1).max(1024),
});

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

/**
 * The actor for these credentials, or null. Records the time of a successful sign-in; a failure is counted
 * against the account and the address (lib/auth/rate-limit.ts) and written to the audit trail. While either is
 * over its allowance every attempt fails, even with the right password.
 */
export async function verifyCredentials(input: unknown, address = "unknown"): Promise<Actor | null> {
  const parsed = credentialsSchema.safeParse(input);
  if (!parsed.success) {
    await recordFailure("sign-in", { address });
    return null;
  }
  const { email, password } = parsed.data;
  const subject = { account: email, address };
  if (await retryAfter("sign-in", subject)) return null;
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const fail = async () => {
    await recordFailure("sign-in", subject);
    await recordAudit(db, {
      actorId: null,
      action: "user.sign_in_failed",
      subjectType: "user",
      subjectId: user?.id ?? "unknown",
      details: { email, address, reason: !user ? "unknown_email" : user.disabled ? "disabled" : "wrong_password" },
    });
    return null;
  };
  if (!user || !user.passwordHash) {
    await verifyPassword(await decoy(), password);
    return fail();
  }
  const matches = await verifyPassword(user.passwordHash, password);
  if (!matches || user.disabled) return fail();
  await forgiveAccount("sign-in", email);
  await db.transaction(async (tx) => {
    await tx.update(users).set({ lastSignInAt: new Date() }).where(eq(users.id, user.id));
    await recordAudit(tx, { actorId: user.id, action: "user.sign_in", subjectType: "user", subjectId: user.id });
  });
  return { id: user.id, role: user.role, customerId: user.customerId, name: user.name, email: user.email };
}

/** The current state of a user as an actor, or null when the account is gone or disabled. */
export async function loadActor(userId: number): Promise<Actor | null> {
  const [user] = await db.select().from(users).where(eq(users.id, userId)).limit(1);
  if (!user || user.disabled) return null;
  return { id: user.id, role: user.role, customerId: user.customerId, name: user.name, email: user.email };
}
