// The append-only audit trail: who did what to which record, when. Written in the same transaction as the change
// it describes, so a change without its record (or a record of a change that was rolled back) cannot exist.
import type { Db, Tx } from "../db/client";
import { auditEvents } from "../db/schema";

export interface AuditEntry {
  /** Null when the system acted (worker, seed). */
  actorId: number | null;
  /** Dotted verb, e.g. "user.invite", "user.role_change", "finding.decide". */
  action: string;
  subjectType: string;
  subjectId: number | string;
  details?: Record<string, unknown>;
}

export async function recordAudit(executor: Db | Tx, entry: AuditEntry): Promise<void> {
  await executor.insert(auditEvents).values({
    actorId: entry.actorId,
    action: entry.action,
    subjectType: entry.subjectType,
    subjectId: String(entry.subjectId),
    details: entry.details ?? null,
  });
}
