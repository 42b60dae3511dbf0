import { sql } from "drizzle-orm";
import {
  bigint,
  char,
  customType,
  boolean,
  check,
  doublePrecision,
  index,
  inet,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  serial,
  text,
  timestamp,
  uniqueIndex,
  uuid,
  varchar,
} from "drizzle-orm/pg-core";

export const roleEnum = pgEnum("role", ["admin", "lead", "programmer", "operator"]);
export const unitsEnum = pgEnum("units", ["mm", "inch"]);
/** The engine's dialects (lib/gcode/types.ts DIALECTS). */
export const dialectEnum = pgEnum("dialect", ["common", "strict-ngc"]);

export const ROLES = roleEnum.enumValues;
export type Role = (typeof ROLES)[number];

export const users = pgTable(
  "users",
  {
    id: serial("id").primaryKey(),
    email: varchar("email", { length: 254 }).notNull(),
    displayName: varchar("display_name", { length: 100 }).notNull(),
    role: roleEnum("role").notNull(),
    passwordHash: text("password_hash").notNull(),
    disabled: boolean("disabled").notNull().default(false),
    /** Bumped on password change, disable and role change: every older cookie stops working. */
    sessionVersion: integer("session_version").notNull().default(1),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("users_email_lower_idx").on(sql`lower(${t.email})`)],
);

export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;

/** One row per sign-in; the sealed cookie carries its id, so a single sign-out revokes that cookie alone. */
export const sessions = pgTable(
  "sessions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: integer("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    sessionVersion: integer("session_version").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    lastSeenAt: timestamp("last_seen_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    ip: inet("ip"),
    userAgent: varchar("user_agent", { length: 300 }),
  },
  (t) => [index("sessions_user_idx").on(t.userId)],
);

export type SessionRow = typeof sessions.$inferSelect;

export const machines = pgTable(
  "machines",
  {
    id: serial("id").primaryKey(),
    name: varchar("name", { length: 100 }).notNull(),
    notes: text("notes").notNull().default(""),
    units: unitsEnum("units").notNull(),
    travelXMin: doublePrecision("travel_x_min").notNull(),
    travelXMax: doublePrecision("travel_x_max").notNull(),
    travelYMin: doublePrecision("travel_y_min").notNull(),
    travelYMax: doublePrecision("travel_y_max").notNull(),
    travelZMin: doublePrecision("travel_z_min").notNull(),
    travelZMax: doublePrecision("travel_z_max").notNull(),
    /** Units per minute, in the machine's units. */
    rapidRate: doublePrecision("rapid_rate").notNull(),
    maxFeed: doublePrecision("max_feed").notNull(),
    /** Revolutions per minute. */
    maxSpindle: doublePrecision("max_spindle").notNull(),
    /** Units per second squared. */
    acceleration: doublePrecision("acceleration").notNull(),
    toolChangeSeconds: doublePrecision("tool_change_seconds").notNull(),
    manualToolChange: boolean("manual_tool_change").notNull(),
    spindleProgramControlled: boolean("spindle_program_controlled").notNull(),
    hMustEqualT: boolean("h_must_equal_t").notNull().default(true),
    safeZ: doublePrecision("safe_z").notNull(),
    workOffsetCount: integer("work_offset_count").notNull(),
    /** How the control reads programs (lib/gcode README "Dialects"). */
    dialect: dialectEnum("dialect").notNull().default("common"),
    /** Arc radius tolerance, machine units; null: the dialect's default. */
    arcTolerance: doublePrecision("arc_tolerance"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex("machines_name_lower_idx").on(sql`lower(${t.name})`),
    check("machines_travel_x", sql`${t.travelXMin} < ${t.travelXMax}`),
    check("machines_travel_y", sql`${t.travelYMin} < ${t.travelYMax}`),
    check("machines_travel_z", sql`${t.travelZMin} < ${t.travelZMax}`),
    check(
      "machines_positive",
      sql`${t.rapidRate} > 0 and ${t.maxFeed} > 0 and ${t.maxSpindle} > 0 and ${t.acceleration} > 0 and ${t.toolChangeSeconds} >= 0 and ${t.workOffsetCount} between 1 and 300`,
    ),
    check("machines_arc_tolerance", sql`${t.arcTolerance} is null or (${t.arcTolerance} > 0 and ${t.arcTolerance} <= 1)`),
  ],
);

export type Machine = typeof machines.$inferSelect;
export type NewMachine = typeof machines.$inferInsert;

/** Append-only: a trigger in the migrations refuses UPDATE and DELETE. */
export const auditEvents = pgTable(
  "audit_events",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    actorId: integer("actor_id").references(() => users.id, { onDelete: "restrict" }),
    /** Kept as written at the time, so the record stays readable if the user is renamed. */
    actorEmail: varchar("actor_email", { length: 254 }),
    action: varchar("action", { length: 64 }).notNull(),
    objectType: varchar("object_type", { length: 32 }),
    objectId: varchar("object_id", { length: 64 }),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
    details: jsonb("details").notNull().default({}),
    ip: inet("ip"),
  },
  (t) => [
    index("audit_events_at_idx").on(t.at),
    index("audit_events_actor_idx").on(t.actorId),
    index("audit_events_object_idx").on(t.objectType, t.objectId),
    index("audit_events_action_idx").on(t.action),
  ],
);

export type AuditEvent = typeof auditEvents.$inferSelect;

/**
 * Repeated events waiting to be written as one audit row (lib/audit.ts, recordRepeatedEvent): the first
 * event of a window goes to audit_events at once, the rest only count here until the window ends.
 */
export const auditRollups = pgTable(
  "audit_rollups",
  {
    /** What groups the events: action plus actor or address plus what is constant, never free text. */
    key: varchar("key", { length: 200 }).primaryKey(),
    /** Who, what and where of the first event; the summary row repeats them. */
    event: jsonb("event").notNull(),
    firstAt: timestamp("first_at", { withTimezone: true }).notNull().defaultNow(),
    lastAt: timestamp("last_at", { withTimezone: true }).notNull().defaultNow(),
    windowEnd: timestamp("window_end", { withTimezone: true }).notNull(),
    /** Events after the first one. */
    repeats: integer("repeats").notNull().default(0),
    /** Up to ten distinct values that varied between the events (e.g. the e-mails tried). */
    samples: jsonb("samples").notNull().default([]),
  },
  (t) => [index("audit_rollups_window_end_idx").on(t.windowEnd)],
);

/** The store of rate-limiter-flexible (its own column layout). */
export const rateLimits = pgTable("rate_limits", {
  key: varchar("key", { length: 255 }).primaryKey(),
  points: integer("points").notNull().default(0),
  expire: bigint("expire", { mode: "number" }),
});

/** Small key/value facts about this installation, e.g. that the demo data was seeded once. */
export const appState = pgTable("app_state", {
  key: varchar("key", { length: 64 }).primaryKey(),
  value: jsonb("value").notNull(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/** PostgreSQL bytea as a Node Buffer. */
const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

export const revisionStatusEnum = pgEnum("revision_status", ["draft", "submitted", "released", "rejected", "superseded"]);
export const analysisStateEnum = pgEnum("analysis_state", ["queued", "running", "done", "failed"]);
export const signatureMeaningEnum = pgEnum("signature_meaning", ["submitted", "released", "rejected", "waived"]);
export const severityEnum = pgEnum("finding_severity", ["error", "warning", "info"]);
export const mailStateEnum = pgEnum("mail_state", ["pending", "sending", "sent", "failed"]);

export const REVISION_STATUSES = revisionStatusEnum.enumValues;
export type RevisionStatus = (typeof REVISION_STATUSES)[number];
export const ANALYSIS_STATES = analysisStateEnum.enumValues;
export type AnalysisState = (typeof ANALYSIS_STATES)[number];
export type SignatureMeaning = (typeof signatureMeaningEnum.enumValues)[number];
export type MailState = (typeof mailStateEnum.enumValues)[number];

export const parts = pgTable(
  "parts",
  {
    id: serial("id").primaryKey(),
    /** The shop's part number, e.g. "FH-2207". */
    number: varchar("number", { length: 64 }).notNull(),
    name: varchar("name", { length: 200 }).notNull(),
    customer: varchar("customer", { length: 200 }).notNull().default(""),
    material: varchar("material", { length: 200 }).notNull().default(""),
    notes: text("notes").notNull().default(""),
    createdBy: integer("created_by").references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("parts_number_lower_idx").on(sql`lower(${t.number})`)],
);

export const programs = pgTable(
  "programs",
  {
    id: serial("id").primaryKey(),
    /** The number the control knows the program by, e.g. "O1001"; unique per machine. */
    programNumber: varchar("program_number", { length: 32 }).notNull(),
    title: varchar("title", { length: 200 }).notNull(),
    partId: integer("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "restrict" }),
    machineId: integer("machine_id")
      .notNull()
      .references(() => machines.id, { onDelete: "restrict" }),
    /** Setup or operation name, e.g. "OP10 first side". */
    operation: varchar("operation", { length: 100 }).notNull().default(""),
    partsPerCycle: integer("parts_per_cycle").notNull().default(1),
    /** Safe Z for this program in its units; null means the machine's. */
    safeZ: doublePrecision("safe_z"),
    createdBy: integer("created_by")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    /** Highest revision number ever given (numbers are never reused, even after a draft is deleted). */
    lastRevisionNumber: integer("last_revision_number").notNull().default(0),
    /** The newest revision still present, kept under the program row's lock (lists filter on it). */
    latestRevisionId: integer("latest_revision_id"),
    /** The released revision, if any. */
    releasedRevisionId: integer("released_revision_id"),
  },
  (t) => [
    uniqueIndex("programs_machine_number_idx").on(t.machineId, sql`lower(${t.programNumber})`),
    index("programs_part_idx").on(t.partId),
    index("programs_number_idx").on(sql`lower(${t.programNumber})`),
    index("programs_latest_idx").on(t.latestRevisionId),
    index("programs_updated_idx").on(t.updatedAt),
    index("programs_title_idx").on(sql`lower(${t.title})`),
    check("programs_parts_per_cycle", sql`${t.partsPerCycle} between 1 and 100`),
  ],
);

/** The exact bytes of every uploaded file, once per content (identical uploads share a row). Never updated. */
export const programFiles = pgTable("program_files", {
  sha256: char("sha256", { length: 64 }).primaryKey(),
  size: bigint("size", { mode: "number" }).notNull(),
  bytes: bytea("bytes").notNull(),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * Bytes of a large upload written while it is still arriving (COPY, streamed), before its SHA-256 is known. The
 * upload's transaction moves them into program_files and deletes the row. UNLOGGED (custom migration): nothing here
 * needs to survive a crash, and PostgreSQL empties the table after one.
 */
export const programFileUploads = pgTable("program_file_uploads", {
  uploadId: uuid("upload_id").primaryKey(),
  bytes: bytea("bytes").notNull(),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
});

export const revisions = pgTable(
  "revisions",
  {
    id: serial("id").primaryKey(),
    programId: integer("program_id")
      .notNull()
      .references(() => programs.id, { onDelete: "restrict" }),
    /** 1, 2, 3 ... per program, given under the program row's lock. */
    number: integer("number").notNull(),
    /** A cleaned display label only; never used as a path. */
    fileName: varchar("file_name", { length: 120 }).notNull(),
    sha256: char("sha256", { length: 64 })
      .notNull()
      .references(() => programFiles.sha256, { onDelete: "restrict" }),
    size: bigint("size", { mode: "number" }).notNull(),
    lineCount: integer("line_count").notNull(),
    uploadedBy: integer("uploaded_by")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    note: varchar("note", { length: 2000 }).notNull().default(""),
    status: revisionStatusEnum("status").notNull().default("draft"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    submittedAt: timestamp("submitted_at", { withTimezone: true }),
    decidedAt: timestamp("decided_at", { withTimezone: true }),
    decidedBy: integer("decided_by").references(() => users.id, { onDelete: "restrict" }),
    supersededAt: timestamp("superseded_at", { withTimezone: true }),
    supersededById: integer("superseded_by_id"),
  },
  (t) => [
    uniqueIndex("revisions_program_number_idx").on(t.programId, t.number),
    index("revisions_sha256_idx").on(t.sha256),
    index("revisions_status_idx").on(t.status),
    index("revisions_uploaded_by_idx").on(t.uploadedBy),
  ],
);

/**
 * The current analysis of a revision (one row per revision, replaced on re-analysis). Kept apart from the revision
 * so that a released revision stays untouched while its checks are re-run against a changed machine or engine.
 */
export const revisionAnalyses = pgTable(
  "revision_analyses",
  {
    revisionId: integer("revision_id")
      .primaryKey()
      .references(() => revisions.id, { onDelete: "cascade" }),
    state: analysisStateEnum("state").notNull().default("queued"),
    /** Why the last attempt failed (kept while a retry is pending, cleared when one succeeds). */
    error: text("error"),
    attempts: integer("attempts").notNull().default(0),
    /** Bumped by every request for an analysis; a finished run whose request was overtaken leaves the state queued. */
    requestSeq: integer("request_seq").notNull().default(1),
    /** The request_seq the running (or last) attempt started from. */
    runSeq: integer("run_seq"),
    queuedAt: timestamp("queued_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    engineVersion: integer("engine_version"),
    /** What the analysis ran with. */
    machineId: integer("machine_id"),
    safeZ: doublePrecision("safe_z"),
    partsPerCycle: integer("parts_per_cycle"),
    units: unitsEnum("units"),
    /** Work offset codes in order of first use. */
    workOffsets: text("work_offsets").array(),
    toolCount: integer("tool_count"),
    toolChangeCount: integer("tool_change_count"),
    /** Tool numbers in the order they are loaded. */
    toolSequence: integer("tool_sequence").array(),
    toolOrder: varchar("tool_order", { length: 16 }),
    totalSeconds: doublePrecision("total_seconds"),
    feedSeconds: doublePrecision("feed_seconds"),
    rapidSeconds: doublePrecision("rapid_seconds"),
    bounds: jsonb("bounds"),
    errorCount: integer("error_count"),
    warningCount: integer("warning_count"),
    infoCount: integer("info_count"),
    /** The engine's whole result less the toolpath (the browser rebuilds that from the bytes). */
    result: jsonb("result"),
  },
  (t) => [index("revision_analyses_state_idx").on(t.state), index("revision_analyses_engine_idx").on(t.engineVersion)],
);

export const revisionTools = pgTable(
  "revision_tools",
  {
    revisionId: integer("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "cascade" }),
    toolNumber: integer("tool_number").notNull(),
    description: varchar("description", { length: 300 }),
    lengthOffsets: integer("length_offsets").array().notNull(),
    firstLine: integer("first_line").notNull(),
    loads: integer("loads").notNull(),
    totalSeconds: doublePrecision("total_seconds").notNull(),
    lowestZ: doublePrecision("lowest_z"),
  },
  (t) => [primaryKey({ columns: [t.revisionId, t.toolNumber] }), index("revision_tools_number_idx").on(t.toolNumber, t.revisionId)],
);

export const revisionOffsets = pgTable(
  "revision_offsets",
  {
    revisionId: integer("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "cascade" }),
    code: varchar("code", { length: 16 }).notNull(),
    position: integer("position").notNull(),
    firstLine: integer("first_line"),
    totalSeconds: doublePrecision("total_seconds").notNull(),
  },
  (t) => [primaryKey({ columns: [t.revisionId, t.code] }), index("revision_offsets_code_idx").on(t.code, t.revisionId)],
);

export const revisionFindings = pgTable(
  "revision_findings",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    revisionId: integer("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "cascade" }),
    rule: varchar("rule", { length: 40 }).notNull(),
    severity: severityEnum("severity").notNull(),
    line: integer("line").notNull(),
    message: text("message").notNull(),
    hint: text("hint").notNull(),
  },
  (t) => [index("revision_findings_revision_idx").on(t.revisionId), index("revision_findings_rule_idx").on(t.rule, t.revisionId)],
);

/** Electronic signatures: append-only (a trigger refuses UPDATE and DELETE). */
export const signatures = pgTable(
  "signatures",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    revisionId: integer("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "restrict" }),
    signerId: integer("signer_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    /** The signer's name and e-mail as they were at the time. */
    signerName: varchar("signer_name", { length: 100 }).notNull(),
    signerEmail: varchar("signer_email", { length: 254 }).notNull(),
    meaning: signatureMeaningEnum("meaning").notNull(),
    comment: text("comment").notNull().default(""),
    /** The SHA-256 of the bytes signed. */
    sha256: char("sha256", { length: 64 }).notNull(),
    /** For a waiver: the finding waived (rule, line, message). */
    finding: jsonb("finding"),
    signedAt: timestamp("signed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("signatures_revision_idx").on(t.revisionId)],
);

export const apiTokens = pgTable(
  "api_tokens",
  {
    id: serial("id").primaryKey(),
    userId: integer("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 100 }).notNull(),
    /** SHA-256 (hex) of the token; the token itself is shown once and never stored. */
    tokenHash: char("token_hash", { length: 64 }).notNull(),
    /** The token's first characters, to tell tokens apart in lists. */
    prefix: varchar("prefix", { length: 16 }).notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("api_tokens_hash_idx").on(t.tokenHash), index("api_tokens_user_idx").on(t.userId)],
);

/** Mail written in the transaction of the change it reports, sent after commit by the worker. */
export const mailOutbox = pgTable(
  "mail_outbox",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    /** Stable Message-ID, the same on every attempt. */
    messageId: varchar("message_id", { length: 200 }).notNull(),
    kind: varchar("kind", { length: 40 }).notNull(),
    recipients: text("recipients").array().notNull(),
    subject: varchar("subject", { length: 300 }).notNull(),
    body: text("body").notNull(),
    revisionId: integer("revision_id"),
    state: mailStateEnum("state").notNull().default("pending"),
    attempts: integer("attempts").notNull().default(0),
    nextAttemptAt: timestamp("next_attempt_at", { withTimezone: true }).notNull().defaultNow(),
    /** While state is "sending": when the claim lapses and another sender may try. */
    lockedUntil: timestamp("locked_until", { withTimezone: true }),
    lastError: text("last_error"),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("mail_outbox_message_id_idx").on(t.messageId), index("mail_outbox_due_idx").on(t.state, t.nextAttemptAt)],
);

/** Work offset values set at a machine: where part zero of G54, G55 ... sits in machine coordinates. */
export const machineWorkOffsets = pgTable(
  "machine_work_offsets",
  {
    machineId: integer("machine_id")
      .notNull()
      .references(() => machines.id, { onDelete: "cascade" }),
    code: varchar("code", { length: 16 }).notNull(),
    /** Machine coordinates of part zero, in the machine's units. */
    x: doublePrecision("x").notNull(),
    y: doublePrecision("y").notNull(),
    z: doublePrecision("z").notNull(),
    setBy: integer("set_by").references(() => users.id, { onDelete: "restrict" }),
    setAt: timestamp("set_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.machineId, t.code] })],
);

/**
 * Runs signed off at the machine: before cycle start an operator (or a lead) confirmed the program on the control is
 * the released revision, that every work offset it calls is set and every tool loaded with its length offset measured,
 * and that a dry run was done, then signed with their password. Append-only: a trigger refuses UPDATE and DELETE.
 */
export const runs = pgTable(
  "runs",
  {
    id: bigint("id", { mode: "number" }).primaryKey().generatedAlwaysAsIdentity(),
    revisionId: integer("revision_id")
      .notNull()
      .references(() => revisions.id, { onDelete: "restrict" }),
    programId: integer("program_id")
      .notNull()
      .references(() => programs.id, { onDelete: "restrict" }),
    /** The machine the program belonged to when it was signed off. */
    machineId: integer("machine_id")
      .notNull()
      .references(() => machines.id, { onDelete: "restrict" }),
    /** The SHA-256 of the bytes signed off (the revision's). */
    sha256: char("sha256", { length: 64 }).notNull(),
    operatorId: integer("operator_id")
      .notNull()
      .references(() => users.id, { onDelete: "restrict" }),
    /** The operator's name and e-mail as they were at the time. */
    operatorName: varchar("operator_name", { length: 100 }).notNull(),
    operatorEmail: varchar("operator_email", { length: 254 }).notNull(),
    /** Work offsets confirmed, with the values recorded for the machine as shown: [{ code, x, y, z, setAt, setBy }]. */
    offsets: jsonb("offsets").notNull(),
    /** Tools confirmed loaded, in load order: [{ number, lengthOffsets, diameterOffsets }]. */
    tools: jsonb("tools").notNull(),
    /** The program on the control was compared with this revision (number, first lines, size). */
    identityChecked: boolean("identity_checked").notNull(),
    dryRun: boolean("dry_run").notNull(),
    /** Parts planned for this run, when the operator gave it. */
    quantity: integer("quantity"),
    signedAt: timestamp("signed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("runs_signed_at_idx").on(t.signedAt),
    index("runs_revision_idx").on(t.revisionId),
    index("runs_program_idx").on(t.programId, t.signedAt),
    index("runs_machine_idx").on(t.machineId, t.signedAt),
    index("runs_operator_idx").on(t.operatorId, t.signedAt),
    check("runs_checked", sql`${t.identityChecked} and ${t.dryRun}`),
    check("runs_quantity", sql`${t.quantity} is null or ${t.quantity} between 1 and 100000`),
  ],
);

export type RunRow = typeof runs.$inferSelect;
