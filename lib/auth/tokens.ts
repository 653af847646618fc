// Personal API tokens for scanner stations and other programs. The token is shown once; only its sha256 is kept,
// so a copy of the database does not hand out working tokens. A token acts with its user's current role: a
// disabled user, a revoked or an expired token is refused alike. No "server-only": the CLI and tests use this.
import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, isNull, lte, or, sql } from "drizzle-orm";
import { db, prepared } from "../../db/client";
import { apiTokens, users } from "../../db/schema";
import { recordAudit } from "../audit";
import { AppError, notFound } from "../errors";
import type { Actor } from "./policy";

/** Tokens start with this prefix so a leaked one is easy to recognise (and to search for in logs). */
export const TOKEN_PREFIX = "tym_";
const TOKEN_PATTERN = /^tym_[A-Za-z0-9_-]{43}$/;
/** Last use is written at most this often per token, so a busy scanner station does not write on every call. */
const LAST_USE_GRANULARITY_MS = 60_000;

export const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");

export interface TokenSummary {
  id: number;
  name: string;
  createdAt: Date;
  lastUsedAt: Date | null;
  expiresAt: Date | null;
  revokedAt: Date | null;
}

/** Creates a token for `userId`; returns the token itself, which is never stored and cannot be shown again. */
export async function createApiToken(
  createdBy: number | null,
  userId: number,
  name: string,
  expiresAt: Date | null = null,
): Promise<{ id: number; token: string }> {
  if (expiresAt && expiresAt.getTime() <= Date.now()) {
    throw new AppError("expiry_in_past", "The expiry date must be in the future.", 422);
  }
  const token = TOKEN_PREFIX + randomBytes(32).toString("base64url");
  return db.transaction(async (tx) => {
    const [{ id }] = await tx
      .insert(apiTokens)
      .values({ userId, name, tokenSha256: hashToken(token), expiresAt })
      .$returningId();
    await recordAudit(tx, {
      actorId: createdBy,
      action: "api_token.create",
      subjectType: "api_token",
      subjectId: id,
      details: { userId, name, expiresAt: expiresAt?.toISOString() ?? null },
    });
    return { id, token };
  });
}

export async function listApiTokens(userId: number): Promise<TokenSummary[]> {
  return db
    .select({
      id: apiTokens.id,
      name: apiTokens.name,
      createdAt: apiTokens.createdAt,
      lastUsedAt: apiTokens.lastUsedAt,
      expiresAt: apiTokens.expiresAt,
      revokedAt: apiTokens.revokedAt,
    })
    .from(apiTokens)
    .where(eq(apiTokens.userId, userId))
    .orderBy(desc(apiTokens.id));
}

/** Revokes one of the actor's own tokens (an administrator may revoke anyone's). */
export async function revokeApiToken(actor: Actor, tokenId: number): Promise<void> {
  const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, tokenId)).limit(1);
  if (!row || (row.userId !== actor.id && actor.role !== "admin")) throw notFound("The token");
  if (row.revokedAt) return;
  await db.transaction(async (tx) => {
    await tx.update(apiTokens).set({ revokedAt: new Date() }).where(eq(apiTokens.id, tokenId));
    await recordAudit(tx, { actorId: actor.id, action: "api_token.revoke", subjectType: "api_token", subjectId: tokenId, details: { userId: row.userId } });
  });
}

/** The token's row and its user's, by the token's sha256. */
const tokenWithUser = prepared((database) =>
  database
    .select({
      tokenId: apiTokens.id,
      lastUsedAt: apiTokens.lastUsedAt,
      expiresAt: apiTokens.expiresAt,
      revokedAt: apiTokens.revokedAt,
      id: users.id,
      role: users.role,
      customerId: users.customerId,
      name: users.name,
      email: users.email,
      disabled: users.disabled,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.tokenSha256, sql.placeholder("sha256")))
    .limit(1)
    .prepare(),
);

export type TokenCheck =
  | { ok: true; actor: Actor; tokenId: number; lastUsedAt: Date | null }
  | { ok: false; reason: "malformed" | "unknown" | "revoked" | "expired" | "user_disabled"; userId?: number };

/**
 * Looks a presented token up and judges it, in one query (token and user together) and without writing: callers
 * may run it beside other checks (the rate limit) and record the use only once the request is let through.
 */
export async function findApiToken(token: string): Promise<TokenCheck> {
  if (!TOKEN_PATTERN.test(token)) return { ok: false, reason: "malformed" };
  const [row] = await tokenWithUser().execute({ sha256: hashToken(token) });
  if (!row) return { ok: false, reason: "unknown" };
  if (row.revokedAt) return { ok: false, reason: "revoked", userId: row.id };
  if (row.expiresAt && row.expiresAt.getTime() <= Date.now()) return { ok: false, reason: "expired", userId: row.id };
  if (row.disabled) return { ok: false, reason: "user_disabled", userId: row.id };
  const { id, role, customerId, name, email } = row;
  return { ok: true, tokenId: row.tokenId, lastUsedAt: row.lastUsedAt, actor: { id, role, customerId, name, email } };
}

/** Records a successful use (last use, audit) at most once a minute per token; between those, no write at all. */
export async function recordTokenUse(check: Extract<TokenCheck, { ok: true }>): Promise<void> {
  const now = new Date();
  if (check.lastUsedAt && now.getTime() - check.lastUsedAt.getTime() < LAST_USE_GRANULARITY_MS) return;
  // Many requests of one scanner station arrive together: only the one whose update still finds the old
  // last use records it, so the trail gets one "token used" a minute, not one per request in flight.
  const stale = new Date(now.getTime() - LAST_USE_GRANULARITY_MS);
  await db.transaction(async (tx) => {
    const [result] = await tx
      .update(apiTokens)
      .set({ lastUsedAt: now })
      .where(and(eq(apiTokens.id, check.tokenId), or(isNull(apiTokens.lastUsedAt), lte(apiTokens.lastUsedAt, stale))));
    if (result.affectedRows === 1) await recordAudit(tx, { actorId: check.actor.id, action: "api_token.use", subjectType: "api_token", subjectId: check.tokenId });
  });
}

/** Checks a presented token and records a successful use (at most once a minute per token). */
export async function checkApiToken(token: string): Promise<TokenCheck> {
  const check = await findApiToken(token);
  if (check.ok) await recordTokenUse(check);
  return check;
}
