// Reading the audit trail: one job's events (whoever may read the job: it is the job's record for the customer
// and for auditors) or the whole plant's (administrators). Filterable by kind of event and by person; paginated.
import { and, desc, eq, inArray, or, sql, type SQL } from "drizzle-orm";
import { z } from "zod";
import { db } from "../db/client";
import { auditEvents, findings, inspections, scans, users } from "../db/schema";
import { authorize, type Actor } from "./auth/policy";
import { loadJobFor } from "./pipeline/access";
import { pageSchema, parseInput, type Page } from "./validation";

export const auditQuery = z.object({
  /** A dotted action ("job.update") or its first part ("job") for every action of that kind. */
  kind: z.string().trim().regex(/^[a-z_.]{1,64}$/).optional().catch(undefined),
  personId: z.coerce.number().int().positive().optional().catch(undefined),
  ...pageSchema,
});

export interface AuditRow {
  id: number;
  at: string;
  action: string;
  subjectType: string;
  subjectId: string;
  actorId: number | null;
  actorName: string | null;
  details: Record<string, unknown> | null;
}

export interface AuditPage extends Page<AuditRow> {
  /** What the filters offer: the kinds and people that occur in this trail. */
  kinds: string[];
  people: { id: number; name: string }[];
}

/** Events about one job: the job itself, its artwork revisions and scans, and its sheets' inspections and findings. */
function jobEvents(jobId: number): SQL {
  const scanIds = db.select({ id: sql`cast(${scans.id} as char)` }).from(scans).where(eq(scans.jobId, jobId));
  const inspectionIds = db
    .select({ id: sql`cast(${inspections.id} as char)` })
    .from(inspections)
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .where(eq(scans.jobId, jobId));
  const findingIds = db
    .select({ id: sql`cast(${findings.id} as char)` })
    .from(findings)
    .innerJoin(inspections, eq(inspections.id, findings.inspectionId))
    .innerJoin(scans, eq(scans.id, inspections.scanId))
    .where(eq(scans.jobId, jobId));
  return or(
    and(eq(auditEvents.subjectType, "job"), eq(auditEvents.subjectId, String(jobId))),
    sql`json_value(${auditEvents.details}, '$.jobId') = ${jobId}`,
    and(eq(auditEvents.subjectType, "scan"), inArray(auditEvents.subjectId, scanIds)),
    and(inArray(auditEvents.subjectType, ["inspection", "sheet"]), inArray(auditEvents.subjectId, inspectionIds)),
    and(eq(auditEvents.subjectType, "finding"), inArray(auditEvents.subjectId, findingIds)),
  )!;
}

async function readTrail(scope: SQL | undefined, rawQuery: unknown): Promise<AuditPage> {
  const query = parseInput(auditQuery, rawQuery);
  const conditions: SQL[] = scope ? [scope] : [];
  if (query.kind) {
    conditions.push(query.kind.includes(".") ? eq(auditEvents.action, query.kind) : sql`${auditEvents.action} like ${`${query.kind}.%`}`);
  }
  if (query.personId) conditions.push(eq(auditEvents.actorId, query.personId));
  const where = conditions.length ? and(...conditions) : undefined;
  const [rows, [{ total }], kinds, people] = await Promise.all([
    db
      .select({
        id: auditEvents.id,
        at: auditEvents.at,
        action: auditEvents.action,
        subjectType: auditEvents.subjectType,
        subjectId: auditEvents.subjectId,
        actorId: auditEvents.actorId,
        actorName: users.name,
        details: auditEvents.details,
      })
      .from(auditEvents)
      .leftJoin(users, eq(users.id, auditEvents.actorId))
      .where(where)
      .orderBy(desc(auditEvents.at), desc(auditEvents.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
    db.select({ total: sql<number>`count(*)`.mapWith(Number) }).from(auditEvents).where(where),
    db.selectDistinct({ action: auditEvents.action }).from(auditEvents).where(scope).orderBy(auditEvents.action),
    db
      .selectDistinct({ id: users.id, name: users.name })
      .from(auditEvents)
      .innerJoin(users, eq(users.id, auditEvents.actorId))
      .where(scope)
      .orderBy(users.name),
  ]);
  return {
    rows: rows.map((r) => ({ ...r, at: r.at.toISOString() })),
    total,
    page: query.page,
    pageSize: query.pageSize,
    kinds: kinds.map((k) => k.action),
    people,
  };
}

export async function listJobAudit(actor: Actor, jobId: number, rawQuery: unknown): Promise<AuditPage> {
  const job = await loadJobFor(actor, jobId, "job.read");
  return readTrail(jobEvents(job.id), rawQuery);
}

export async function listPlantAudit(actor: Actor, rawQuery: unknown): Promise<AuditPage> {
  authorize(actor, "audit.read");
  return readTrail(undefined, rawQuery);
}
