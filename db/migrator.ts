// Applies the committed migrations in db/migrations (made by `npm run db:generate`).
import path from "node:path";
import { fileURLToPath } from "node:url";
import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import mysql from "mysql2/promise";

export const migrationsFolder = path.join(path.dirname(fileURLToPath(import.meta.url)), "migrations");

/** Bring the database at `url` up to the newest migration; safe to run again. */
export async function migrateDatabase(url: string): Promise<void> {
  const connection = await mysql.createConnection({ uri: url, timezone: "Z" });
  try {
    await connection.query("SET time_zone = '+00:00'");
    await migrate(drizzle(connection), { migrationsFolder });
  } finally {
    await connection.end();
  }
}
