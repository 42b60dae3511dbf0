import { z } from "zod";
import { REVISION_STATUSES } from "@/db/schema";
import { RULE_IDS, type RuleId } from "@/lib/gcode/types";
import { workOffsetValuesSchema } from "@/lib/machine-profile";
import { calendarDate, decimalNumber, multiLineText, positiveId, positiveIdFromText, singleLineText } from "@/lib/validation";

/** One line of plain text (the shared block: no control characters, line breaks or bidi marks). */
export const singleLine = (label: string, max: number, min = 1) =>
  singleLineText({ max, required: min > 0 ? `Enter ${label}.` : undefined });

/** Free text (notes, comments): the shared multi-line block. */
export const multiLine = (label: string, max: number, min = 0) =>
  multiLineText({ max, required: min > 0 ? `Enter ${label}.` : undefined });

/** A record id from a JSON number or a query string's canonical digits. */
const id = (label: string) =>
  z.unknown().transform((v, ctx) => {
    const n = typeof v === "string" ? positiveIdFromText(v) : positiveId(v);
    if (n === null) {
      ctx.addIssue({ code: "custom", message: `Pick ${label}.` });
      return z.NEVER;
    }
    return n;
  });

/** A whole number from lo to hi, from a JSON number or a plain decimal string. */
export const wholeNumber = (lo: number, hi: number) =>
  decimalNumber("Enter a whole number.")
    .refine((n) => Number.isInteger(n), "Enter a whole number.")
    .refine((n) => n >= lo, `At least ${lo}.`)
    .refine((n) => n <= hi, `At most ${hi}.`);

const blank = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

/** A shop part number or program number: letters, digits and - _ . / (e.g. "FH-2207", "O1001"). */
const code = (label: string, max: number) =>
  singleLine(label, max).refine((s) => /^[A-Za-z0-9][A-Za-z0-9._/-]*$/.test(s), "Use letters, digits and - _ . / only.");

export const partCreateSchema = z.object({
  number: code("a part number", 64),
  name: singleLine("a name", 200),
  customer: singleLine("a customer", 200, 0).default(""),
  material: singleLine("a material", 200, 0).default(""),
  notes: multiLine("notes", 4000).default(""),
});
export type PartInput = z.infer<typeof partCreateSchema>;

const programFields = {
  programNumber: code("a program number", 32),
  title: singleLine("a title", 200),
  partId: id("a part"),
  machineId: id("a machine"),
  operation: singleLine("an operation", 100, 0).default(""),
  partsPerCycle: wholeNumber(1, 100).default(1),
  /** Null: use the machine's safe Z. */
  safeZ: z.preprocess(blank, decimalNumber("Enter a number.").nullable().default(null)),
};

export const programCreateSchema = z.object(programFields);
export type ProgramInput = z.infer<typeof programCreateSchema>;

export const programUpdateSchema = z
  .object({
    title: programFields.title.optional(),
    partId: programFields.partId.optional(),
    machineId: programFields.machineId.optional(),
    operation: singleLine("an operation", 100, 0).optional(),
    partsPerCycle: wholeNumber(1, 100).optional(),
    safeZ: z.preprocess(blank, decimalNumber("Enter a number.").nullable()).optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, "Nothing to change.");
export type ProgramUpdate = z.infer<typeof programUpdateSchema>;

export const PROGRAM_SORTS = ["programNumber", "title", "part", "machine", "updated", "status"] as const;
export const PROGRAM_PAGE_SIZE = 25;

/** GET /api/programs query: every filter optional, blank means absent. */
export const programListSchema = z.object({
  q: z.preprocess(blank, singleLine("a search", 100).optional()),
  part: z.preprocess(blank, singleLine("a part", 64).optional()),
  program: z.preprocess(blank, singleLine("a program number", 32).optional()),
  machine: z.preprocess(blank, id("a machine").optional()),
  status: z.preprocess(blank, z.enum(REVISION_STATUSES, { error: "Pick a status." }).optional()),
  tool: z.preprocess(blank, wholeNumber(0, 99_999).optional()),
  rule: z.preprocess(blank, z.enum(RULE_IDS as readonly RuleId[] as [RuleId, ...RuleId[]], { error: "Pick a rule." }).optional()),
  offset: z.preprocess(blank, singleLine("a work offset", 16).optional()),
  sort: z.preprocess(blank, z.enum(PROGRAM_SORTS).default("updated")),
  dir: z.preprocess(blank, z.enum(["asc", "desc"]).optional()),
  page: z.preprocess(blank, wholeNumber(1, 100_000).default(1)),
  pageSize: z.preprocess(blank, wholeNumber(1, 100).default(PROGRAM_PAGE_SIZE)),
});
export type ProgramListQuery = z.infer<typeof programListSchema>;

export const submitSchema = z.object({ comment: multiLine("a comment", 2000).default("") });

export const waiverSchema = z.object({
  rule: z.enum(RULE_IDS as readonly RuleId[] as [RuleId, ...RuleId[]], { error: "Name the rule of the finding." }),
  line: z.number().int().min(0),
  reason: multiLine("a reason", 1000, 1),
});
export type WaiverInput = z.infer<typeof waiverSchema>;

export const releaseSchema = z.object({
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200),
  comment: multiLine("a comment", 2000, 1),
  waivers: z.array(waiverSchema).max(2000).default([]),
});
export type ReleaseInput = z.infer<typeof releaseSchema>;

export const rejectSchema = z.object({ comment: multiLine("a comment", 2000, 1) });

export const tokenCreateSchema = z.object({ name: singleLine("a name", 100) });

const workOffsetCode = z.string().trim().toUpperCase().pipe(workOffsetValuesSchema.keyType);
export const workOffsetSetSchema = z.object({
  code: workOffsetCode,
  x: decimalNumber("Enter a number."),
  y: decimalNumber("Enter a number."),
  z: decimalNumber("Enter a number."),
});
export const workOffsetClearSchema = z.object({ code: workOffsetCode });

/** Find-or-create query of POST /api/revisions (pushes from a CAM post-processor). */
export const pushQuerySchema = z.object({
  program: code("a program number", 32),
  machine: singleLine("a machine (id or name)", 100),
  part: z.preprocess(blank, code("a part number", 64).optional()),
  title: z.preprocess(blank, singleLine("a title", 200).optional()),
  operation: z.preprocess(blank, singleLine("an operation", 100).optional()),
  note: z.preprocess(blank, multiLine("a note", 2000).optional()),
  name: z.string().max(1000).optional(),
});

export const outboxListSchema = z.object({
  state: z.preprocess(blank, z.enum(["pending", "sending", "sent", "failed"]).optional()),
  page: z.preprocess(blank, wholeNumber(1, 100_000).default(1)),
});

/** GET /api/revisions/{a}/compare/{b}: unchanged lines shown around each change. */
export const compareQuerySchema = z.object({ context: z.preprocess(blank, wholeNumber(0, 50).optional()) });

/** A SHA-256 as 64 hex digits (any case in, lower case out). */
const sha256Hex = z
  .string({ error: "Give the SHA-256 you compared." })
  .trim()
  .toLowerCase()
  .regex(/^[0-9a-f]{64}$/, "Give the SHA-256 you compared: 64 hex digits.");

export const RUN_QUANTITY_MAX = 100_000;

/**
 * POST /api/revisions/{id}/runs and the run page's form: the sign-off before cycle start. Boxes left out count as not
 * ticked, so the data layer can name every missing one (422) rather than zod reporting a missing field.
 */
export const runSignOffSchema = z.object({
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200),
  /** The SHA-256 the operator compared: it must be the revision's. */
  sha256: sha256Hex,
  /** The program on the control is this revision (number, first lines, size compared). */
  identity: z.boolean({ error: "Tick it or leave it out." }).default(false),
  /** Work offsets set at the control and checked. */
  offsets: z.array(workOffsetCode).max(300).default([]),
  /** Tools loaded with their length offsets measured. */
  tools: z.array(wholeNumber(0, 99_999)).max(1000).default([]),
  dryRun: z.boolean({ error: "Tick it or leave it out." }).default(false),
  /** Parts planned for this run (optional). */
  quantity: z.preprocess(blank, wholeNumber(1, RUN_QUANTITY_MAX).nullable().default(null)),
  /**
   * When each work offset value shown to the operator was recorded (null: not recorded). A value recorded again since
   * the page was loaded is refused (409): the operator checks it again. Optional for API callers.
   */
  shown: z
    .array(z.object({ code: workOffsetCode, setAt: z.iso.datetime({ error: "An ISO time." }).nullable() }))
    .max(300)
    .optional(),
});
export type RunSignOffInput = z.infer<typeof runSignOffSchema>;

export const RUN_PAGE_SIZE = 50;

/** GET /api/runs and the /runs page: every filter optional, blank means absent; days are whole UTC days. */
export const runListSchema = z
  .object({
    machine: z.preprocess(blank, id("a machine").optional()),
    /** Program number, prefix, any case. */
    program: z.preprocess(blank, singleLine("a program number", 32).optional()),
    programId: z.preprocess(blank, id("a program").optional()),
    operator: z.preprocess(blank, id("an operator").optional()),
    from: z.preprocess(blank, calendarDate().optional()),
    to: z.preprocess(blank, calendarDate().optional()),
    page: z.preprocess(blank, wholeNumber(1, 100_000).default(1)),
    pageSize: z.preprocess(blank, wholeNumber(1, 100).default(RUN_PAGE_SIZE)),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ["to"], message: "The last day comes before the first." });
export type RunListQuery = z.infer<typeof runListSchema>;
