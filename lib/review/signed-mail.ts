// Who is told of a sign-off and what the message says: the job's customer contacts (customers.contact_emails)
// and the plant's prepress users, one message to all.
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { customers, findings, sheetSignoffs } from "@/db/schema";
import { ROLE_LABELS, type Role } from "@/lib/auth/policy";
import type { SheetMailContext, SignedMailContext } from "@/lib/mail/messages";
import { usersWithRoles } from "@/lib/pipeline/records";
import { MEANING_LABELS } from "./signoff";

export async function signedMail(base: SheetMailContext, signoffId: number, customerId: number) {
  const [signoff] = await db.select().from(sheetSignoffs).where(eq(sheetSignoffs.id, signoffId));
  if (!signoff || signoff.inspectionId !== base.inspectionId) return null;
  const rows = await db.select({ decision: findings.decision }).from(findings).where(eq(findings.inspectionId, base.inspectionId));
  const [customer] = await db.select({ contacts: customers.contactEmails }).from(customers).where(eq(customers.id, customerId));
  const prepress = await usersWithRoles(["prepress"]);
  const seen = new Set<string>();
  const recipients: { name: string; email: string }[] = [];
  for (const r of [...(customer?.contacts ?? []).map((email) => ({ name: "", email })), ...prepress]) {
    const key = r.email.toLowerCase();
    if (seen.has(key)) continue;
    seen.add(key);
    recipients.push(r);
  }
  const context: SignedMailContext = {
    ...base,
    findingsCount: rows.length,
    rejectedCount: rows.filter((r) => r.decision === "rejected").length,
    verdict: signoff.verdict,
    meaning: MEANING_LABELS[signoff.meaning],
    signerName: signoff.signerName,
    signerRole: ROLE_LABELS[signoff.signerRole as Role] ?? signoff.signerRole,
    signedAtUtc: signoff.signedAt.toISOString().slice(0, 19).replace("T", " "),
    recordSha256: signoff.recordSha256,
  };
  return { context, recipients };
}
