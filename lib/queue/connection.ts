// Redis connections for BullMQ. Workers block on Redis and must never give up a command (BullMQ requires
// maxRetriesPerRequest: null); producers in the web app fail fast instead, so a Redis outage turns into a
// clear error for the user rather than a request that hangs. No "server-only": the worker imports this.
import { Redis, type RedisOptions } from "ioredis";
import { env } from "@/lib/env";

export function workerConnection(): Redis {
  return new Redis(env.REDIS_URL, { maxRetriesPerRequest: null, enableReadyCheck: true, retryStrategy: backoff });
}

export function producerConnection(): Redis {
  return new Redis(env.REDIS_URL, {
    maxRetriesPerRequest: 2,
    enableOfflineQueue: false,
    retryStrategy: (times) => Math.min(backoff(times), 1000),
  } satisfies RedisOptions);
}

/** Wait briefly for a (re)connecting producer; a Redis that stays away is an error the caller reports. */
export async function whenReady(connection: Redis, timeoutMs = 5000): Promise<void> {
  if (connection.status === "ready") return;
  await new Promise<void>((resolve, reject) => {
    const onReady = () => {
      clearTimeout(timer);
      resolve();
    };
    const timer = setTimeout(() => {
      connection.off("ready", onReady);
      reject(new Error("The job queue (Redis) is not reachable"));
    }, timeoutMs);
    connection.once("ready", onReady);
  });
}

/** Reconnect after 0.2 s, growing to 5 s: a restarted Redis is picked up again within seconds. */
function backoff(times: number): number {
  return Math.min(200 * 2 ** Math.min(times, 5), 5000);
}
