// Tympan's tables (Drizzle, MariaDB 10.11 via mysql2).
//
// Units, stored once and the same way everywhere:
// - Lengths are INTEGER MICROMETRES (µm = mm × 1000), columns end in `_um`. Origin is the top-left of the
//   artwork page's trim box (media box when there is none), x to the right, y down.
// - Areas are integer square micrometres in a BIGINT (`_um2`, mm² × 1 000 000): a whole press sheet fits
//   well inside 2^53, so `mode: "number"` stays exact.
// - ΔE00 values, rotation (degrees) and scale are DOUBLE; they are measured figures, not money.
// - Times are DATETIME(3) in UTC (the pool sets the session time zone to +00:00).
// - Excluded areas of a tolerance profile are JSON in millimetres (RectMm[]), because people edit them in mm.
//
// MariaDB notes: ids are BIGINT UNSIGNED AUTO_INCREMENT (`serial()` emits SQL MariaDB refuses); JSON is stored
// as LONGTEXT, so `json()` below parses on the way out; inserts get ids back with `$returningId()`.
import { relations, sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  char,
  customType,
  datetime,
  double,
  index,
  int,
  mysqlEnum,
  mysqlTable,
  smallint,
  text,
  tinyint,
  uniqueIndex,
  varchar,
} from "drizzle-orm/mysql-core";

/** JSON column that always comes back parsed (MariaDB hands JSON back as a string). */
export const json = <T>(name: string) =>
  customType<{ data: T; driverData: string }>({
    dataType: () => "json",
    toDriver: (value) => JSON.stringify(value),
    fromDriver: (value) => (typeof value === "string" ? (JSON.parse(value) as T) : (value as T)),
  })(name);

const id = () => bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey();
const ref = (name: string) => bigint(name, { mode: "number", unsigned: true });
const createdAt = () =>
  datetime("created_at", { mode: "date", fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`);
const updatedAt = () =>
  datetime("updated_at", { mode: "date", fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`)
    .$onUpdate(() => new Date());
const at = (name: string) => datetime(name, { mode: "date", fsp: 3 });
const sha256 = (name: string) => char(name, { length: 64 });
const objectKey = (name: string) => varchar(name, { length: 512 });

export const ROLES = ["admin", "prepress", "qa", "reviewer", "customer"] as const;
export const JOB_STATUSES = ["prepress", "on_press", "completed", "cancelled"] as const;
export const ARTWORK_STATUSES = ["draft", "approved", "superseded"] as const;
export const RASTER_STATUSES = ["none", "pending", "ready", "failed"] as const;
export const INSPECTION_STATUSES = ["queued", "running", "done", "failed"] as const;
export const VERDICTS = ["pending", "passed", "failed"] as const;
// extra_ink / missing_ink are spots and voids; changed_text is a changed or missing piece of text or linework;
// streak is a scratch or streak (long and thin).
export const FINDING_KINDS = ["extra_ink", "missing_ink", "colour_shift", "changed_text", "streak"] as const;
export const DECISION_REASONS = ["no_defect", "within_tolerance", "defect"] as const;
/** How a finding stands in its press run: once, at the same place on consecutive sheets, or in every up. */
export const RECURRENCES = ["isolated", "repeating", "every_up"] as const;
export const TILE_STATUSES = ["none", "pending", "ready", "failed"] as const;
/** What a reviewer's signature on a sheet means. */
export const SIGNATURE_MEANINGS = ["reviewed", "approved_for_release", "rejected"] as const;
export const DECISIONS = ["pending", "accepted", "rejected"] as const;

export interface RectMm {
  x: number;
  y: number;
  w: number;
  h: number;
}

/**
 * An area the engine reports nothing inside (variable data: lot, expiry, sheet numbers, codes printed later).
 * "sheet": x/y from the top-left of the artwork page; "up": x/y from the top-left of each up, repeated in every up.
 */
export interface ExcludedArea extends RectMm {
  scope: "sheet" | "up";
  label: string;
}

/** What the worker's preflight of an artwork PDF found (lib/pipeline/preflight.ts). */
export interface ArtworkPreflight {
  /** BaseFont names of fonts the PDF uses without embedding them, in the order first met. */
  nonEmbeddedFonts: string[];
}

export const customers = mysqlTable("customers", {
  id: id(),
  name: varchar("name", { length: 200 }).notNull().unique(),
  // Who is told of sign-offs (lower-cased addresses).
  contactEmails: json<string[]>("contact_emails")
    .notNull()
    .default(sql`('[]')`),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

export const users = mysqlTable(
  "users",
  {
    id: id(),
    // Stored lower-cased; the unique index is what refuses a second account for one address.
    email: varchar("email", { length: 254 }).notNull().unique(),
    name: varchar("name", { length: 200 }).notNull(),
    // Null until an invited user sets a password.
    passwordHash: varchar("password_hash", { length: 255 }),
    role: mysqlEnum("role", ROLES).notNull(),
    // Set for customer users only: the brand owner whose jobs they may read.
    customerId: ref("customer_id").references(() => customers.id),
    disabled: boolean("disabled").notNull().default(false),
    lastSignInAt: at("last_sign_in_at"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("users_customer_idx").on(t.customerId)],
);

export const userInvites = mysqlTable(
  "user_invites",
  {
    id: id(),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id),
    // Only the sha256 of the one-time token is kept; the token itself travels in the e-mail.
    tokenSha256: sha256("token_sha256").notNull().unique(),
    createdBy: ref("created_by").references(() => users.id),
    createdAt: createdAt(),
    expiresAt: at("expires_at").notNull(),
    usedAt: at("used_at"),
  },
  (t) => [index("user_invites_user_idx").on(t.userId)],
);

export const jobs = mysqlTable(
  "jobs",
  {
    id: id(),
    customerId: ref("customer_id")
      .notNull()
      .references(() => customers.id),
    jobNumber: varchar("job_number", { length: 32 }).notNull().unique(),
    title: varchar("title", { length: 200 }).notNull(),
    stock: varchar("stock", { length: 200 }).notNull().default(""),
    press: varchar("press", { length: 100 }).notNull().default(""),
    status: mysqlEnum("status", JOB_STATUSES).notNull().default("prepress"),
    // Resolution the artwork is rasterised at for comparison.
    artworkDpi: smallint("artwork_dpi", { unsigned: true }).notNull().default(300),
    upsRows: smallint("ups_rows", { unsigned: true }).notNull().default(1),
    upsColumns: smallint("ups_columns", { unsigned: true }).notNull().default(1),
    boardThicknessUm: int("board_thickness_um", { unsigned: true }),
    // Sheets the press run is to print; null until known.
    runLengthSheets: int("run_length_sheets", { unsigned: true }),
    // The job's tolerance profile for new inspections; null means the plant's default.
    toleranceProfileId: ref("tolerance_profile_id").references(() => toleranceProfiles.id),
    createdBy: ref("created_by").references(() => users.id),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("jobs_customer_idx").on(t.customerId)],
);

export const artworkRevisions = mysqlTable(
  "artwork_revisions",
  {
    id: id(),
    jobId: ref("job_id")
      .notNull()
      .references(() => jobs.id),
    revision: int("revision", { unsigned: true }).notNull(),
    sourceKey: objectKey("source_key").notNull(),
    sourceSha256: sha256("source_sha256").notNull(),
    originalFilename: varchar("original_filename", { length: 255 }).notNull().default(""),
    byteSize: bigint("byte_size", { mode: "number", unsigned: true }).notNull().default(0),
    pageCount: smallint("page_count", { unsigned: true }).notNull().default(1),
    pageWidthUm: int("page_width_um", { unsigned: true }).notNull(),
    pageHeightUm: int("page_height_um", { unsigned: true }).notNull(),
    // Which PDF box defines the page: "TrimBox" or "MediaBox".
    pageBox: varchar("page_box", { length: 16 }).notNull().default("TrimBox"),
    upsRows: smallint("ups_rows", { unsigned: true }).notNull().default(1),
    upsColumns: smallint("ups_columns", { unsigned: true }).notNull().default(1),
    // Rectangle the ups occupy; null means the whole page.
    upsAreaXUm: int("ups_area_x_um", { unsigned: true }),
    upsAreaYUm: int("ups_area_y_um", { unsigned: true }),
    upsAreaWUm: int("ups_area_w_um", { unsigned: true }),
    upsAreaHUm: int("ups_area_h_um", { unsigned: true }),
    status: mysqlEnum("status", ARTWORK_STATUSES).notNull().default("draft"),
    excludedAreas: json<ExcludedArea[]>("excluded_areas")
      .notNull()
      .default(sql`('[]')`),
    supersededAt: at("superseded_at"),
    uploadedBy: ref("uploaded_by").references(() => users.id),
    approvedBy: ref("approved_by").references(() => users.id),
    approvedAt: at("approved_at"),
    // Raster cache of the artwork page(s) at the job's dpi.
    rasterStatus: mysqlEnum("raster_status", RASTER_STATUSES).notNull().default("none"),
    rasterDpi: smallint("raster_dpi", { unsigned: true }),
    rasterKeys: json<string[]>("raster_keys"),
    rasterError: text("raster_error"),
    // The artwork's side of the comparison, prepared once by the raster job for every worker host.
    preparedKey: objectKey("prepared_key"),
    // The preflight of the PDF, made by the worker with the draft's preview; null until it has run.
    preflight: json<ArtworkPreflight>("preflight"),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("artwork_revisions_job_revision_uq").on(t.jobId, t.revision)],
);

export const toleranceProfiles = mysqlTable("tolerance_profiles", {
  id: id(),
  name: varchar("name", { length: 64 }).notNull().unique(),
  label: varchar("label", { length: 200 }).notNull(),
  minDefectUm: int("min_defect_um", { unsigned: true }).notNull(),
  deltaE00Threshold: double("delta_e00_threshold").notNull(),
  registrationToleranceUm: int("registration_tolerance_um", { unsigned: true }).notNull(),
  excludedAreasMm: json<RectMm[]>("excluded_areas_mm").notNull(),
  builtin: boolean("builtin").notNull().default(false),
  createdAt: createdAt(),
  updatedAt: updatedAt(),
});

export const scans = mysqlTable(
  "scans",
  {
    id: id(),
    jobId: ref("job_id")
      .notNull()
      .references(() => jobs.id),
    artworkRevisionId: ref("artwork_revision_id")
      .notNull()
      .references(() => artworkRevisions.id),
    // The inkjet-printed serial number of the pulled sheet; null when QA could not read it.
    sheetNumber: int("sheet_number", { unsigned: true }),
    objectKey: objectKey("object_key").notNull(),
    sha256: sha256("sha256").notNull(),
    dpi: smallint("dpi", { unsigned: true }).notNull(),
    byteSize: bigint("byte_size", { mode: "number", unsigned: true }).notNull(),
    originalFilename: varchar("original_filename", { length: 255 }).notNull().default(""),
    contentType: varchar("content_type", { length: 100 }).notNull().default(""),
    uploadedBy: ref("uploaded_by").references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [
    // The same file uploaded twice to one job is recognised, not stored twice.
    uniqueIndex("scans_job_sha256_uq").on(t.jobId, t.sha256),
    // A sheet number is unique in a press run (one artwork revision); rows without a number are not compared.
    uniqueIndex("scans_revision_sheet_uq").on(t.artworkRevisionId, t.sheetNumber),
    index("scans_artwork_revision_idx").on(t.artworkRevisionId),
  ],
);

export const inspections = mysqlTable(
  "inspections",
  {
    id: id(),
    scanId: ref("scan_id")
      .notNull()
      .references(() => scans.id),
    artworkRevisionId: ref("artwork_revision_id")
      .notNull()
      .references(() => artworkRevisions.id),
    toleranceProfileId: ref("tolerance_profile_id")
      .notNull()
      .references(() => toleranceProfiles.id),
    status: mysqlEnum("status", INSPECTION_STATUSES).notNull().default("queued"),
    // Free text so the engine can add stages without a migration (e.g. rasterise, align, compare).
    stage: varchar("stage", { length: 32 }),
    progressPercent: tinyint("progress_percent", { unsigned: true }).notNull().default(0),
    errorCode: varchar("error_code", { length: 64 }),
    errorMessage: text("error_message"),
    rotationDeg: double("rotation_deg"),
    scale: double("scale"),
    txUm: int("tx_um"),
    tyUm: int("ty_um"),
    residualUm: int("residual_um", { unsigned: true }),
    correlation: double("correlation"),
    coveredXUm: int("covered_x_um"),
    coveredYUm: int("covered_y_um"),
    coveredWUm: int("covered_w_um", { unsigned: true }),
    coveredHUm: int("covered_h_um", { unsigned: true }),
    driftDeltaE00: double("drift_delta_e00"),
    verdict: mysqlEnum("verdict", VERDICTS).notNull().default("pending"),
    signedBy: ref("signed_by").references(() => users.id),
    signedAt: at("signed_at"),
    // The words the reviewer signed with (name, role, statement), kept as written.
    signature: text("signature"),
    timingsMs: json<Record<string, number>>("timings_ms"),
    // Deep-zoom tile pyramids (artwork, aligned scan, difference) under one key prefix.
    tilesStatus: mysqlEnum("tiles_status", TILE_STATUSES).notNull().default("none"),
    tilesPrefix: objectKey("tiles_prefix"),
    attempts: smallint("attempts", { unsigned: true }).notNull().default(0),
    // Bumped on every user-visible change; a stale sign-off is refused.
    version: int("version", { unsigned: true }).notNull().default(0),
    createdAt: createdAt(),
    startedAt: at("started_at"),
    finishedAt: at("finished_at"),
    updatedAt: updatedAt(),
  },
  (t) => [
    index("inspections_scan_idx").on(t.scanId),
    index("inspections_status_idx").on(t.status),
  ],
);

export const findings = mysqlTable(
  "findings",
  {
    id: id(),
    inspectionId: ref("inspection_id")
      .notNull()
      .references(() => inspections.id),
    // Box in artwork page coordinates, µm.
    xUm: int("x_um").notNull(),
    yUm: int("y_um").notNull(),
    wUm: int("w_um", { unsigned: true }).notNull(),
    hUm: int("h_um", { unsigned: true }).notNull(),
    areaUm2: bigint("area_um2", { mode: "number", unsigned: true }).notNull(),
    deltaE00Mean: double("delta_e00_mean").notNull(),
    deltaE00Max: double("delta_e00_max").notNull(),
    kind: mysqlEnum("kind", FINDING_KINDS).notNull(),
    // 1-based, row-major; null when outside every up.
    upIndex: smallint("up_index", { unsigned: true }),
    cropArtworkKey: objectKey("crop_artwork_key"),
    cropScanKey: objectKey("crop_scan_key"),
    cropDifferenceKey: objectKey("crop_difference_key"),
    decision: mysqlEnum("decision", DECISIONS).notNull().default("pending"),
    decidedBy: ref("decided_by").references(() => users.id),
    decidedAt: at("decided_at"),
    decisionReason: mysqlEnum("decision_reason", DECISION_REASONS),
    comment: text("comment"),
    recurrence: mysqlEnum("recurrence", RECURRENCES),
    // Run memory: the accepted finding of an earlier sheet at the same place, suggested but never applied alone.
    priorFindingId: ref("prior_finding_id"),
    // Optimistic concurrency: an update names the version it saw.
    version: int("version", { unsigned: true }).notNull().default(0),
    createdAt: createdAt(),
  },
  (t) => [index("findings_inspection_idx").on(t.inspectionId)],
);

/** Append-only record for customers and auditors; rows are never updated or deleted. */
export const auditEvents = mysqlTable(
  "audit_events",
  {
    id: id(),
    // Null when the system acted (worker, seed).
    actorId: ref("actor_id").references(() => users.id),
    action: varchar("action", { length: 64 }).notNull(),
    subjectType: varchar("subject_type", { length: 32 }).notNull(),
    subjectId: varchar("subject_id", { length: 64 }).notNull(),
    at: datetime("at", { mode: "date", fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    details: json<Record<string, unknown>>("details"),
  },
  (t) => [
    index("audit_events_subject_idx").on(t.subjectType, t.subjectId),
    index("audit_events_at_idx").on(t.at),
  ],
);

/**
 * A reviewer's signature on a sheet: kept as signed, with a sha256 over the inspection's record at that moment.
 * Reopening (an administrator, with a reason) fills the reopened_* columns; the row itself stays.
 */
export const sheetSignoffs = mysqlTable(
  "sheet_signoffs",
  {
    id: id(),
    inspectionId: ref("inspection_id")
      .notNull()
      .references(() => inspections.id),
    signedBy: ref("signed_by")
      .notNull()
      .references(() => users.id),
    signerName: varchar("signer_name", { length: 200 }).notNull(),
    signerRole: varchar("signer_role", { length: 32 }).notNull(),
    meaning: mysqlEnum("meaning", SIGNATURE_MEANINGS).notNull(),
    verdict: mysqlEnum("verdict", ["passed", "failed"]).notNull(),
    recordSha256: sha256("record_sha256").notNull(),
    signedAt: datetime("signed_at", { mode: "date", fsp: 3 }).notNull(),
    reopenedBy: ref("reopened_by").references(() => users.id),
    reopenedAt: at("reopened_at"),
    reopenReason: text("reopen_reason"),
  },
  (t) => [index("sheet_signoffs_inspection_idx").on(t.inspectionId)],
);

export const apiTokens = mysqlTable(
  "api_tokens",
  {
    id: id(),
    name: varchar("name", { length: 100 }).notNull(),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id),
    tokenSha256: sha256("token_sha256").notNull().unique(),
    createdAt: createdAt(),
    lastUsedAt: at("last_used_at"),
    expiresAt: at("expires_at"),
    revokedAt: at("revoked_at"),
  },
  (t) => [index("api_tokens_user_idx").on(t.userId)],
);

export const customersRelations = relations(customers, ({ many }) => ({ jobs: many(jobs), users: many(users) }));
export const usersRelations = relations(users, ({ one }) => ({
  customer: one(customers, { fields: [users.customerId], references: [customers.id] }),
}));
export const jobsRelations = relations(jobs, ({ one, many }) => ({
  customer: one(customers, { fields: [jobs.customerId], references: [customers.id] }),
  artworkRevisions: many(artworkRevisions),
  scans: many(scans),
}));
export const artworkRevisionsRelations = relations(artworkRevisions, ({ one, many }) => ({
  job: one(jobs, { fields: [artworkRevisions.jobId], references: [jobs.id] }),
  scans: many(scans),
}));
export const scansRelations = relations(scans, ({ one, many }) => ({
  job: one(jobs, { fields: [scans.jobId], references: [jobs.id] }),
  artworkRevision: one(artworkRevisions, { fields: [scans.artworkRevisionId], references: [artworkRevisions.id] }),
  inspections: many(inspections),
}));
export const inspectionsRelations = relations(inspections, ({ one, many }) => ({
  scan: one(scans, { fields: [inspections.scanId], references: [scans.id] }),
  artworkRevision: one(artworkRevisions, {
    fields: [inspections.artworkRevisionId],
    references: [artworkRevisions.id],
  }),
  toleranceProfile: one(toleranceProfiles, {
    fields: [inspections.toleranceProfileId],
    references: [toleranceProfiles.id],
  }),
  findings: many(findings),
}));
export const findingsRelations = relations(findings, ({ one }) => ({
  inspection: one(inspections, { fields: [findings.inspectionId], references: [inspections.id] }),
}));

export type Customer = typeof customers.$inferSelect;
export type User = typeof users.$inferSelect;
export type Job = typeof jobs.$inferSelect;
export type ArtworkRevision = typeof artworkRevisions.$inferSelect;
export type ToleranceProfileRow = typeof toleranceProfiles.$inferSelect;
export type Scan = typeof scans.$inferSelect;
export type Inspection = typeof inspections.$inferSelect;
export type FindingRow = typeof findings.$inferSelect;
export type AuditEvent = typeof auditEvents.$inferSelect;
export type ApiToken = typeof apiTokens.$inferSelect;
export type SheetSignoff = typeof sheetSignoffs.$inferSelect;
