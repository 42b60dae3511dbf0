import { sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  check,
  doublePrecision,
  index,
  inet,
  integer,
  jsonb,
  pgEnum,
  pgTable,
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
