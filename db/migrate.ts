// `npm run db:migrate`: apply pending migrations to DATABASE_URL and say where.
import { env } from "../lib/env";
import { migrateDatabase } from "./migrator";

const target = new URL(env.DATABASE_URL);
try {
  await migrateDatabase(env.DATABASE_URL);
  console.log(`Migrations applied to ${target.host}${target.pathname}.`);
} catch (error) {
  console.error(`Migrating ${target.host}${target.pathname} failed:`, error);
  process.exitCode = 1;
}
