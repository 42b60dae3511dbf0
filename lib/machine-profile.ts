import { z } from "zod";
import { DIALECTS, type AnalyzeOptions, type MachineProfile } from "./gcode/types";
import type { MachineInput } from "./validation";

const range = z
  .object({ min: z.number().finite(), max: z.number().finite() })
  .refine((r) => r.min < r.max, { message: "min must be below max" });
const positive = z.number().finite().positive();

/** A machine profile as the engine takes it; the CLI's --machine file and the machines table both meet it. */
export const machineProfileSchema = z
  .object({
    units: z.enum(["mm", "inch"]),
    travel: z.object({ x: range, y: range, z: range }),
    rapidRate: positive,
    maxFeed: positive,
    maxSpindle: positive,
    acceleration: positive,
    toolChangeSeconds: z.number().finite().nonnegative(),
    manualToolChange: z.boolean(),
    spindleProgramControlled: z.boolean(),
    hMustEqualT: z.boolean(),
    safeZ: z.number().finite(),
    workOffsetCount: z.number().int().min(1).max(300),
    dialect: z.enum(DIALECTS).optional(),
    arcTolerance: positive.max(1).optional(),
  })
  .strict() satisfies z.ZodType<MachineProfile>;

/** Work offset origins in machine coordinates, keyed "G54", "G59.1", "G54.1 P3". */
export const workOffsetValuesSchema = z.record(
  z.string().regex(/^G5[4-9](\.[1-3])?$|^G54\.1 P\d{1,3}$/, "a work offset code such as G54, G59.1 or G54.1 P3"),
  z.object({ x: z.number().finite(), y: z.number().finite(), z: z.number().finite() }).strict(),
) satisfies z.ZodType<NonNullable<AnalyzeOptions["workOffsets"]>>;

/** A machines row's engine-facing fields (what the machine form validates, less name and notes). */
export type MachineFields = Omit<MachineInput, "name" | "notes">;

/** The engine's profile from a machines row (same fields, travel folded into ranges). */
export function toMachineProfile(m: MachineFields): MachineProfile {
  return {
    units: m.units,
    travel: {
      x: { min: m.travelXMin, max: m.travelXMax },
      y: { min: m.travelYMin, max: m.travelYMax },
      z: { min: m.travelZMin, max: m.travelZMax },
    },
    rapidRate: m.rapidRate,
    maxFeed: m.maxFeed,
    maxSpindle: m.maxSpindle,
    acceleration: m.acceleration,
    toolChangeSeconds: m.toolChangeSeconds,
    manualToolChange: m.manualToolChange,
    spindleProgramControlled: m.spindleProgramControlled,
    hMustEqualT: m.hMustEqualT,
    safeZ: m.safeZ,
    workOffsetCount: m.workOffsetCount,
    dialect: m.dialect,
    // no value: the dialect's default tolerance
    ...(m.arcTolerance === null ? {} : { arcTolerance: m.arcTolerance }),
  };
}
