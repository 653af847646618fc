// The one actor resolution for route handlers: an API token (`Authorization: Bearer tym_…`) or the session cookie.
// Either way the user is re-read from the database, so a disabled account or a changed role applies at once.
// A change (POST, PUT, PATCH, DELETE) made with the cookie must come from our own pages: a browser on another
// site could otherwise send it with the user's cookie. A token is never sent by a browser on its own, so token
// requests need no such check. No "server-only": tests call route handlers with plain Requests.
import { getToken } from "next-auth/jwt";
import { recordAudit } from "../audit";
import { db } from "../../db/client";
import { env } from "../env";
import { AppError, notSignedIn, tooManyAttempts } from "../errors";
import { loadActor } from "./credentials";
import type { Actor } from "./policy";
import { clientAddress, recordFailure, retryAfter } from "./rate-limit";
import { findApiToken, recordTokenUse, type TokenCheck } from "./tokens";

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

export const invalidToken = () =>
  new AppError("invalid_token", "The API token is not valid: it may be mistyped, revoked or expired, or its user disabled.", 401);
export const crossOrigin = () =>
  new AppError("cross_origin", "This change was sent from another site and was refused. Use Tympan's own pages or an API token.", 403);

function parseCookies(header: string | null): Map<string, string> {
  const map = new Map<string, string>();
  for (const part of (header ?? "").split(";")) {
    const at = part.indexOf("=");
    if (at > 0) map.set(part.slice(0, at).trim(), decodeURIComponent(part.slice(at + 1).trim()));
  }
  return map;
}

/** True when a browser tells us the request came from a page of another origin. */
export function isCrossOrigin(request: Request): boolean {
  const allowed = new Set([new URL(env.APP_URL).origin, new URL(request.url).origin]);
  const host = request.headers.get("host");
  if (host) allowed.add(`${new URL(request.url).protocol}//${host}`);
  const origin = request.headers.get("origin");
  if (origin) return !allowed.has(origin);
  const site = request.headers.get("sec-fetch-site");
  return site === "cross-site" || site === "same-site";
}

async function actorFromToken(request: Request, authorization: string): Promise<Actor> {
  const address = clientAddress(request.headers);
  const [scheme, token, ...rest] = authorization.trim().split(/\s+/);
  const wellFormed = scheme?.toLowerCase() === "bearer" && token && rest.length === 0;
  // The address's block and the token's row are independent reads: one wait for both. Nothing is written (last
  // use, audit, failure count) until the block has been looked at, as when they ran one after the other.
  const [wait, check]: [number | null, TokenCheck] = await Promise.all([
    retryAfter("token", { address }),
    wellFormed ? findApiToken(token) : Promise.resolve({ ok: false, reason: "malformed" } as const),
  ]);
  if (wait) throw tooManyAttempts(wait);
  if (check.ok) {
    await recordTokenUse(check);
    return check.actor;
  }
  const account = check.userId ? `user:${check.userId}` : undefined;
  if (check.userId) {
    await recordAudit(db, { actorId: check.userId, action: "api_token.refused", subjectType: "user", subjectId: check.userId, details: { reason: check.reason, address } });
  }
  const blocked = await recordFailure("token", { address, account });
  if (blocked) throw tooManyAttempts(blocked);
  throw invalidToken();
}

/** The actor behind `request`, or null when it carries neither a token nor a live session. Throws on a bad token. */
export async function actorFromRequest(request: Request): Promise<Actor | null> {
  const authorization = request.headers.get("authorization");
  if (authorization) return actorFromToken(request, authorization);
  const cookies = parseCookies(request.headers.get("cookie"));
  if (![...cookies.keys()].some((name) => name.includes("next-auth.session-token"))) return null;
  const session = await getToken({ req: { cookies, headers: {} } as never, secret: env.NEXTAUTH_SECRET, secureCookie: env.APP_URL.startsWith("https://") });
  const id = session?.uid;
  if (typeof id !== "number" || !Number.isFinite(id)) return null;
  const actor = await loadActor(id);
  if (actor && !SAFE_METHODS.has(request.method) && isCrossOrigin(request)) throw crossOrigin();
  return actor;
}

/** For route handlers: the actor, or the 401 AppError. */
export async function requestActor(request: Request): Promise<Actor> {
  const actor = await actorFromRequest(request);
  if (!actor) throw notSignedIn();
  return actor;
}
