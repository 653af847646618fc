// Rate limits on guessing: failed sign-ins and refused API tokens, counted per account and per client address in
// Redis (so every web process shares the counts). Only failures count: a scanner station with a good token and a
// person who types their password right are never slowed down. When Redis is away the counts fall back to this
// process's memory rather than letting guesses through unlimited. No "server-only": tests use this directly.
import { RateLimiterMemory, RateLimiterRedis, RateLimiterRes } from "rate-limiter-flexible";
import { env } from "../env";
import { producerConnection } from "../queue/connection";

const WINDOW_SECONDS = 15 * 60;

function limiter(keyPrefix: string, points: number) {
  const globalCache = globalThis as unknown as { __tympanLimiters?: Map<string, RateLimiterRedis> };
  globalCache.__tympanLimiters ??= new Map();
  let found = globalCache.__tympanLimiters.get(keyPrefix);
  if (!found) {
    found = new RateLimiterRedis({
      storeClient: redis(),
      keyPrefix: `tympan-rl:${keyPrefix}`,
      points,
      duration: WINDOW_SECONDS,
      blockDuration: WINDOW_SECONDS,
      rejectIfRedisNotReady: true,
      insuranceLimiter: new RateLimiterMemory({ keyPrefix, points, duration: WINDOW_SECONDS, blockDuration: WINDOW_SECONDS }),
    });
    globalCache.__tympanLimiters.set(keyPrefix, found);
  }
  return found;
}

function redis() {
  const globalCache = globalThis as unknown as { __tympanLimitRedis?: ReturnType<typeof producerConnection> };
  globalCache.__tympanLimitRedis ??= producerConnection();
  return globalCache.__tympanLimitRedis;
}

export type LimitKind = "sign-in" | "token";

const limiters = {
  account: (kind: LimitKind) => limiter(`${kind}:account`, env.RATE_LIMIT_ACCOUNT_FAILURES),
  address: (kind: LimitKind) => limiter(`${kind}:address`, env.RATE_LIMIT_ADDRESS_FAILURES),
};

export interface LimitSubject {
  /** Lower-cased e-mail or user id; absent when the attempt names no known account. */
  account?: string;
  address: string;
}

/** Seconds until `subject` may try again, or null when it is not blocked. */
export async function retryAfter(kind: LimitKind, subject: LimitSubject): Promise<number | null> {
  const checks: [RateLimiterRedis, string][] = [[limiters.address(kind), subject.address]];
  if (subject.account) checks.push([limiters.account(kind), subject.account]);
  let wait = 0;
  for (const [l, key] of checks) {
    const state = await l.get(key).catch(() => null);
    if (state && state.consumedPoints >= l.points) wait = Math.max(wait, Math.ceil(state.msBeforeNext / 1000));
  }
  return wait > 0 ? wait : null;
}

/** Counts one failed attempt; returns seconds to wait when this failure used up the allowance. */
export async function recordFailure(kind: LimitKind, subject: LimitSubject): Promise<number | null> {
  const checks: [RateLimiterRedis, string][] = [[limiters.address(kind), subject.address]];
  if (subject.account) checks.push([limiters.account(kind), subject.account]);
  let wait = 0;
  for (const [l, key] of checks) {
    try {
      await l.consume(key);
    } catch (result) {
      if (result instanceof RateLimiterRes) wait = Math.max(wait, Math.ceil(result.msBeforeNext / 1000));
    }
  }
  return wait > 0 ? wait : null;
}

/** A successful sign-in forgives that account's earlier failures (not the address's). */
export async function forgiveAccount(kind: LimitKind, account: string): Promise<void> {
  await limiters.account(kind).delete(account).catch(() => undefined);
}

/**
 * The client's address as the nearest proxy saw it: the last X-Forwarded-For entry (Next sets the header from
 * the socket when no proxy did). Behind a load balancer, that balancer must overwrite the header.
 */
export function clientAddress(headers: Headers): string {
  const forwarded = headers.get("x-forwarded-for");
  const last = forwarded?.split(",").at(-1)?.trim();
  return last || headers.get("x-real-ip") || "unknown";
}
