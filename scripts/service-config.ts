// Prints the local services' settings as shell assignments for scripts/services.sh, derived from the same
// validated environment the app uses (lib/env.ts), so ports and credentials are defined in one place.
import { env } from "../lib/env";

const database = new URL(env.DATABASE_URL);
const redis = new URL(env.REDIS_URL);
const s3 = new URL(env.S3_ENDPOINT);
const smtp = new URL(env.SMTP_URL);
const loopback = (host: string) => ["127.0.0.1", "localhost", "::1", "[::1]"].includes(host);

const values: Record<string, string> = {
  DB_HOST: database.hostname,
  DB_PORT: database.port || "3306",
  DB_NAME: decodeURIComponent(database.pathname.replace(/^\//, "")),
  DB_USER: decodeURIComponent(database.username),
  DB_PASSWORD: decodeURIComponent(database.password),
  DB_LOCAL: loopback(database.hostname) ? "1" : "0",
  REDIS_PORT: redis.port || "6379",
  REDIS_PASSWORD: decodeURIComponent(redis.password),
  REDIS_LOCAL: loopback(redis.hostname) ? "1" : "0",
  S3_PORT: s3.port || (s3.protocol === "https:" ? "443" : "80"),
  S3_BUCKET: env.S3_BUCKET,
  S3_LOCAL: loopback(s3.hostname) ? "1" : "0",
  SMTP_PORT: smtp.port || "25",
  SMTP_LOCAL: loopback(smtp.hostname) ? "1" : "0",
  MAILDEV_WEB_PORT: process.env.MAILDEV_WEB_PORT ?? "1080",
  APP_PORT: new URL(env.APP_URL).port || "3000",
};

const quote = (value: string) => `'${value.replace(/'/g, `'\\''`)}'`;
for (const [name, value] of Object.entries(values)) console.log(`${name}=${quote(value)}`);
