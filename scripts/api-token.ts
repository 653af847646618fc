// `npm run api-token -- --email EMAIL [--name NAME] [--days N]`: prints a new personal API token for an existing,
// active user (for a scanner station, say). The token acts with that user's role; it is printed once and only
// its sha256 is stored. Revoke it in the app under Settings → API tokens.
import { parseArgs } from "node:util";
import { eq } from "drizzle-orm";
import { closeDb, db } from "../db/client";
import { users } from "../db/schema";
import { normaliseEmail } from "../lib/auth/credentials";
import { createApiToken } from "../lib/auth/tokens";

function fail(message: string): never {
  console.error(message);
  process.exit(2);
}

const { values } = parseArgs({
  options: { email: { type: "string" }, name: { type: "string" }, days: { type: "string" } },
  strict: true,
}) as { values: { email?: string; name?: string; days?: string } };

if (!values.email) fail("Usage: npm run api-token -- --email EMAIL [--name NAME] [--days N]");
const name = (values.name ?? "Command line").trim();
if (name.length < 1 || name.length > 100) fail("The token's name must be 1 to 100 characters.");
let expiresAt: Date | null = null;
if (values.days !== undefined) {
  const days = Number(values.days);
  if (!Number.isInteger(days) || days < 1 || days > 3650) fail("--days must be a whole number from 1 to 3650.");
  expiresAt = new Date(Date.now() + days * 86_400_000);
}

try {
  const [user] = await db.select().from(users).where(eq(users.email, normaliseEmail(values.email))).limit(1);
  if (!user) fail(`There is no user with the e-mail ${values.email}.`);
  if (user.disabled) fail(`The account ${user.email} is disabled; enable it first.`);
  const { token } = await createApiToken(null, user.id, name, expiresAt);
  console.log(token);
  console.error(`Token “${name}” for ${user.email} (${user.role})${expiresAt ? `, valid until ${expiresAt.toISOString()}` : ""}. Keep it secret: it is not shown again.`);
} finally {
  await closeDb();
}
