// The committed migrations build the whole schema on an empty database, and applying them twice is harmless.
import { randomUUID } from "node:crypto";
import mysql from "mysql2/promise";
import { afterAll, describe, expect, it } from "vitest";
import { migrateDatabase } from "../../db/migrator";
import { env } from "../../lib/env";
import "./fixtures";

const base = new URL(env.DATABASE_URL);
const emptyName = `${base.pathname.slice(1)}_empty_${randomUUID().slice(0, 6)}`;
const emptyUrl = new URL(env.DATABASE_URL);
emptyUrl.pathname = `/${emptyName}`;

const TABLES = [
  "api_tokens",
  "artwork_revisions",
  "audit_events",
  "customers",
  "findings",
  "inspections",
  "jobs",
  "scans",
  "tolerance_profiles",
  "user_invites",
  "users",
];

async function admin() {
  const url = new URL(env.DATABASE_URL);
  url.pathname = "/";
  return mysql.createConnection({ uri: url.toString() });
}

afterAll(async () => {
  const connection = await admin();
  await connection.query(`DROP DATABASE IF EXISTS \`${emptyName}\``);
  await connection.end();
});

describe("migrations", () => {
  it("apply to an empty database and create every table", async () => {
    const connection = await admin();
    await connection.query(`CREATE DATABASE \`${emptyName}\``);
    await migrateDatabase(emptyUrl.toString());
    const [rows] = await connection.query<mysql.RowDataPacket[]>(
      "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ?",
      [emptyName],
    );
    await connection.end();
    const names = rows.map((r) => r.name as string);
    expect(names).toEqual(expect.arrayContaining([...TABLES, "__drizzle_migrations"]));
  });

  it("are idempotent: a second run changes nothing and does not fail", async () => {
    await expect(migrateDatabase(emptyUrl.toString())).resolves.toBeUndefined();
  });

  it("store ids as BIGINT UNSIGNED AUTO_INCREMENT and lengths as integer micrometres", async () => {
    const connection = await admin();
    const [columns] = await connection.query<mysql.RowDataPacket[]>(
      `SELECT table_name AS t, column_name AS c, column_type AS type, extra FROM information_schema.columns
       WHERE table_schema = ? AND (column_name = 'id' OR column_name LIKE '%\\_um')`,
      [emptyName],
    );
    await connection.end();
    for (const column of columns) {
      if (column.c === "id") {
        expect(column.type, `${column.t}.id`).toBe("bigint(20) unsigned");
        expect(column.extra, `${column.t}.id`).toContain("auto_increment");
      } else {
        expect(column.type, `${column.t}.${column.c}`).toMatch(/^int\(1[01]\)/);
      }
    }
    expect(columns.filter((c) => c.c !== "id").length).toBeGreaterThan(15);
  });
});
