import { z } from "zod";
import { ROLES } from "@/db/schema";

export const emailSchema = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .min(1, "Enter an e-mail address.")
  .max(254, "At most 254 characters.")
  .pipe(z.email("Enter a valid e-mail address."))
  .transform((s) => s.toLowerCase());

export const newPasswordSchema = z
  .string({ error: "Enter a password." })
  .min(12, "At least 12 characters.")
  .max(200, "At most 200 characters.");

export const signInSchema = z.object({
  email: z.string({ error: "Enter your e-mail address." }).trim().min(1, "Enter your e-mail address.").max(254),
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200),
});

export const roleSchema = z.enum(ROLES, { error: "Pick a role." });

export const displayNameSchema = z
  .string({ error: "Enter a name." })
  .trim()
  .min(1, "Enter a name.")
  .max(100, "At most 100 characters.");

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

const finite = (label: string) =>
  z.coerce.number({ error: `${label}: enter a number.` }).refine(Number.isFinite, `${label}: enter a number.`);
const positive = (label: string) => finite(label).refine((n) => n > 0, `${label} must be above 0.`);

export const machineSchema = z
  .object({
    name: z.string().trim().min(1, "Enter a name.").max(100, "At most 100 characters."),
    notes: z.string().trim().max(2000, "At most 2000 characters.").default(""),
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
    workOffsetCount: z.coerce
      .number({ error: "Enter a whole number." })
      // A refine, not .int(): zod's integer check aborts the object and would hide the cross-field errors.
      .refine(Number.isInteger, "Enter a whole number.")
      .refine((n) => n >= 1, "At least 1.")
      .refine((n) => n <= 300, "At most 300."),
    dialect: z.enum(["common", "strict-ngc"], { error: "Pick a dialect." }).default("common"),
    // Blank means the dialect's default tolerance.
    arcTolerance: z
      .union([z.literal("").transform(() => null), z.null(), finite("Arc tolerance")])
      .optional()
      .transform((v) => v ?? null)
      .refine((n) => n === null || (n > 0 && n <= 1), "Arc tolerance must be above 0 and at most 1."),
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
  return [v[a], v[b]].every((x) => x !== undefined && x !== null && x !== "" && Number.isFinite(Number(x)));
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
