import { z } from "zod";
import { ROLES } from "@/db/schema";

// Shared building blocks for every field a person types or a file carries. Use these rather than a bare
// z.string() or z.coerce.number(): they refuse what PostgreSQL cannot store (NUL), what breaks a log or a
// header line (CR, LF, other control characters), what makes a name display as something else (bidi
// overrides), and numbers JavaScript would coerce from odd input ("0x10", [5], true, null).

/** C0 controls, DEL and C1 controls. */
const CONTROL_CHARS = /[\u0000-\u001f\u007f-\u009f]/;
/** The same, less TAB and LF, which a multi-line field keeps. */
const CONTROL_CHARS_MULTILINE = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f]/;
/** Line and paragraph separators and the bidirectional embedding, override and isolate marks. */
const LAYOUT_MARKS = /[\u2028\u2029\u202a-\u202e\u2066-\u2069]/;
/** A UTF-16 surrogate without its other half: not text, and it cannot be stored as UTF-8. */
const LONE_SURROGATE = /[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/;

export interface TextOptions {
  /** Most characters allowed (after trimming). */
  max: number;
  /** The message for a missing or blank value; leave out to allow "". */
  required?: string;
}

/**
 * One line of user text (a name, a title, a search term): trimmed; no control characters at all
 * (NUL, TAB, CR, LF, BEL, ESC...), no line separators or bidi overrides, no lone surrogates.
 */
export function singleLineText({ max, required }: TextOptions) {
  const base = z.string({ error: required ?? "Enter text." }).trim();
  return (required ? base.min(1, required) : base)
    .max(max, `At most ${max} characters.`)
    .refine((s) => !CONTROL_CHARS.test(s) && !LAYOUT_MARKS.test(s) && !LONE_SURROGATE.test(s), "Use one line of plain text: no line breaks or control characters.");
}

/**
 * Several lines of user text (notes, a comment): trimmed, CR LF and lone CR become LF (browsers send
 * CR LF from a textarea); TAB and LF are kept; every other control character and lone surrogates are refused.
 */
export function multiLineText({ max, required }: TextOptions) {
  const base = z
    .string({ error: required ?? "Enter text." })
    .overwrite((s) => s.replace(/\r\n?/g, "\n"))
    .trim();
  return (required ? base.min(1, required) : base)
    .max(max, `At most ${max} characters.`)
    .refine((s) => !CONTROL_CHARS_MULTILINE.test(s) && !LONE_SURROGATE.test(s), "Use plain text: control characters are not allowed.");
}

/** A plain decimal as a person types it: "12", "-0.5", ".5", "1e3". Not "0x10", "1_000", "Infinity" or "". */
const DECIMAL = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;

/** True when `v` is a finite JSON number or a plain decimal string (what decimalNumber accepts). */
export function isDecimalInput(v: unknown): boolean {
  if (typeof v === "number") return Number.isFinite(v);
  return typeof v === "string" && DECIMAL.test(v.trim()) && Number.isFinite(Number(v));
}

/**
 * A finite number from a form box (a decimal string) or a JSON body (a number). Anything else,
 * including "0x10", [5], true, null, "" and "1e999", fails with `message`.
 */
export function decimalNumber(message: string) {
  return z.preprocess(
    (v) => (typeof v === "string" && DECIMAL.test(v.trim()) ? Number(v.trim()) : v),
    z.number({ error: message }).refine(Number.isFinite, message),
  );
}

/** The largest id PostgreSQL's integer (serial) holds. */
export const MAX_ID = 2_147_483_647;

/** A record id: a JavaScript number that is a whole number from 1 to MAX_ID, else null. */
export function positiveId(v: unknown): number | null {
  return typeof v === "number" && Number.isSafeInteger(v) && v >= 1 && v <= MAX_ID ? v : null;
}

/** A record id written as text (a URL segment): canonical digits only ("7", not "07", "+7", "7.0" or " 7"). */
export function positiveIdFromText(s: string): number | null {
  return /^[1-9]\d{0,9}$/.test(s) ? positiveId(Number(s)) : null;
}

export interface DateRange {
  /** Earliest day accepted, YYYY-MM-DD. */
  min: string;
  /** Latest day accepted, YYYY-MM-DD. */
  max: string;
}

/** The days Cyclegate's records can hold: none before 2000, none after 2099. */
export const RECORD_DAYS: DateRange = { min: "2000-01-01", max: "2099-12-31" };

/** A real calendar day "YYYY-MM-DD" (no 2026-02-30, no month 13) within `range` (string order is date order). */
export function calendarDate(range: DateRange = RECORD_DAYS) {
  return z
    .string({ error: "Use YYYY-MM-DD." })
    .regex(/^\d{4}-\d{2}-\d{2}$/, { error: "Use YYYY-MM-DD.", abort: true })
    .refine((s) => s >= range.min && s <= range.max, { error: `Pick a day from ${range.min} to ${range.max}.`, abort: true })
    .refine(isCalendarDay, "There is no such day.");
}

function isCalendarDay(s: string): boolean {
  const [y, m, d] = s.split("-").map(Number) as [number, number, number];
  const t = new Date(Date.UTC(y, m - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === m - 1 && t.getUTCDate() === d;
}

/** An e-mail address: at most 254 characters, at most 64 before the "@" (RFC 5321), lower-cased. */
export const emailSchema = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .min(1, "Enter an e-mail address.")
  .max(254, "At most 254 characters.")
  .refine((s) => s.lastIndexOf("@") <= 64, "At most 64 characters before the @.")
  .pipe(z.email("Enter a valid e-mail address."))
  .transform((s) => s.toLowerCase());

export const newPasswordSchema = z
  .string({ error: "Enter a password." })
  .min(12, "At least 12 characters.")
  .max(200, "At most 200 characters.");

/** What sign-in accepts: an e-mail no longer than any account's (254), so nothing longer reaches the throttle. */
export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200, "At most 200 characters."),
});

export const roleSchema = z.enum(ROLES, { error: "Pick a role." });

export const displayNameSchema = singleLineText({ max: 100, required: "Enter a name." });

export const userCreateSchema = z.object({
  email: emailSchema,
  displayName: displayNameSchema,
  role: roleSchema,
  password: newPasswordSchema,
});

export const userUpdateSchema = z
  .object({
    displayName: displayNameSchema.optional(),
    role: roleSchema.optional(),
    disabled: z.boolean().optional(),
    password: newPasswordSchema.optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, "Nothing to change.");

export const passwordChangeSchema = z
  .object({
    currentPassword: z.string().min(1, "Enter your current password.").max(200),
    newPassword: newPasswordSchema,
    confirmPassword: z.string(),
  })
  .refine((v) => v.newPassword === v.confirmPassword, {
    path: ["confirmPassword"],
    message: "The two new passwords differ.",
  });

const finite = (label: string) => decimalNumber(`${label}: enter a number.`);
const positive = (label: string) => finite(label).refine((n) => n > 0, `${label} must be above 0.`);

export const machineSchema = z
  .object({
    name: singleLineText({ max: 100, required: "Enter a name." }),
    notes: multiLineText({ max: 2000 }).default(""),
    units: z.enum(["mm", "inch"], { error: "Pick mm or inch." }),
    travelXMin: finite("X min"),
    travelXMax: finite("X max"),
    travelYMin: finite("Y min"),
    travelYMax: finite("Y max"),
    travelZMin: finite("Z min"),
    travelZMax: finite("Z max"),
    rapidRate: positive("Rapid rate"),
    maxFeed: positive("Max cutting feed"),
    maxSpindle: positive("Max spindle speed"),
    acceleration: positive("Acceleration"),
    toolChangeSeconds: finite("Tool change time").refine((n) => n >= 0, "Tool change time cannot be negative."),
    manualToolChange: z.boolean(),
    spindleProgramControlled: z.boolean(),
    hMustEqualT: z.boolean(),
    safeZ: finite("Safe Z"),
    workOffsetCount: decimalNumber("Enter a whole number.")
      // A refine, not .int(): zod's integer check aborts the object and would hide the cross-field errors.
      .refine(Number.isInteger, "Enter a whole number.")
      .refine((n) => n >= 1, "At least 1.")
      .refine((n) => n <= 300, "At most 300."),
  })
  // Each cross-field check runs as soon as its own fields parsed, so one submit shows every error.
  .refine((m) => m.travelXMin < m.travelXMax, {
    path: ["travelXMax"],
    message: "X max must be above X min.",
    when: (p) => bothNumbers(p.value, "travelXMin", "travelXMax"),
  })
  .refine((m) => m.travelYMin < m.travelYMax, {
    path: ["travelYMax"],
    message: "Y max must be above Y min.",
    when: (p) => bothNumbers(p.value, "travelYMin", "travelYMax"),
  })
  .refine((m) => m.travelZMin < m.travelZMax, {
    path: ["travelZMax"],
    message: "Z max must be above Z min.",
    when: (p) => bothNumbers(p.value, "travelZMin", "travelZMax"),
  })
  .refine((m) => m.maxFeed <= m.rapidRate, {
    path: ["maxFeed"],
    message: "Max cutting feed cannot exceed the rapid rate.",
    when: (p) => bothNumbers(p.value, "maxFeed", "rapidRate") && Number((p.value as { rapidRate?: unknown }).rapidRate) > 0,
  });

function bothNumbers(value: unknown, a: string, b: string): boolean {
  const v = value as Record<string, unknown>;
  return [v[a], v[b]].every(isDecimalInput);
}

export type MachineInput = z.infer<typeof machineSchema>;

/** Every field's messages, keyed by field name, plus the form-level ones. */
export function fieldErrors(error: z.ZodError): { fieldErrors: Record<string, string[]>; formErrors: string[] } {
  const flat = z.flattenError(error);
  return { fieldErrors: flat.fieldErrors as Record<string, string[]>, formErrors: flat.formErrors };
}

/** FormData checkboxes: present means true. */
export function formBoolean(fd: FormData, name: string): boolean {
  const v = fd.get(name);
  return v === "on" || v === "true" || v === "1";
}
