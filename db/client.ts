// One mysql2 pool per process, cached on globalThis so Next's dev reloads do not open a new pool each time.
// No "server-only" marker: the worker, scripts and tests use this module too.
import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import { env } from "../lib/env";
import * as schema from "./schema";

function createPool(url: string) {
  const pool = mysql.createPool({
    uri: url,
    connectionLimit: env.DB_POOL_SIZE,
    // Dates leave and arrive as UTC; the session zone makes CURRENT_TIMESTAMP UTC as well.
    timezone: "Z",
    dateStrings: false,
    supportBigNumbers: true,
    bigNumberStrings: false,
  });
  pool.pool.on("connection", (connection) => {
    connection.query("SET time_zone = '+00:00'");
  });
  return pool;
}

/** Drizzle over a pool; "planetscale" mode makes relational queries avoid LATERAL joins, which MariaDB lacks. */
export function createDb(pool: mysql.Pool) {
  return drizzle(pool, { schema, mode: "planetscale" });
}

type Cache = { pool: mysql.Pool; db: ReturnType<typeof createDb> };
const globalCache = globalThis as unknown as { __tympanDb?: Cache };

function cache(): Cache {
  if (!globalCache.__tympanDb) {
    const pool = createPool(env.DATABASE_URL);
    globalCache.__tympanDb = { pool, db: createDb(pool) };
  }
  return globalCache.__tympanDb;
}

export type Db = ReturnType<typeof createDb>;
/** A transaction handle: `db.transaction(async (tx) => …)`. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** The shared database handle. The pool opens lazily on first use. */
export const db: Db = new Proxy({} as Db, {
  get: (_target, property) => Reflect.get(cache().db, property, cache().db),
});

/**
 * A query whose SQL drizzle builds once per pool instead of on every call (`.prepare()` with `sql.placeholder`):
 * building the SQL of a select was a tenth to a sixth of a hot API request's CPU. Re-made after closeDb().
 */
export function prepared<Q>(build: (database: Db) => Q): () => Q {
  const byPool = new WeakMap<mysql.Pool, Q>();
  return () => {
    const { pool, db: database } = cache();
    let query = byPool.get(pool);
    if (!query) byPool.set(pool, (query = build(database)));
    return query;
  };
}

export function getPool(): mysql.Pool {
  return cache().pool;
}

/** Close the pool (scripts, tests, worker shutdown). */
export async function closeDb(): Promise<void> {
  const cached = globalCache.__tympanDb;
  globalCache.__tympanDb = undefined;
  if (cached) await cached.pool.end();
}

export { schema };
