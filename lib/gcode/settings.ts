/**
 * Settings of a run: the options, the machine profile, the report units and everything that depends on them, the
 * defaults used where the profile is silent, and the arc tolerance of the dialect.
 */
import type { Units } from "./types";
import { R } from "./rules";
import { Engine } from "./state";
import * as codes from "./codes";

// imported constants copied into module constants (codes.ts says why)
const { MM_PER_INCH, fmt } = codes;

// ---- defaults without a machine profile (mm; converted) ---------------------------------------------------------
const DEFAULT_RAPID_MM = 5000;
const DEFAULT_ACCEL_MM = 1000;
const DEFAULT_TOOL_CHANGE_S = 5;
// Arc radius tolerance defaults, in mm for G21 and in inches for G20: [NIST] 3.5.3.2 for strict-ngc; README
// "Arc tolerance" for the common dialect's (about 7x the worst rounding of a 3-decimal metric post).
const ARC_TOL_STRICT_MM = 0.002, ARC_TOL_STRICT_IN = 0.0002;
const ARC_TOL_COMMON_MM = 0.02, ARC_TOL_COMMON_IN = 0.001;

/** "G54", "G59.1", "G54.1 P3" (any case, spaces allowed) to a coordinate system number, or -1. */
function parseOffsetKey(key: string): number {
  const k = key.toUpperCase().replace(/\s+/g, "");
  const m = /^G(5[4-9])$/.exec(k);
  if (m) return Number(m[1]) - 53;
  const m2 = /^G59\.([1-3])$/.exec(k);
  if (m2) return 6 + Number(m2[1]);
  const m3 = /^G54\.1P(\d+)$/.exec(k);
  if (m3) return 100 + Number(m3[1]);
  return -1;
}

declare module "./state" {
  interface Engine {
    applyUnits(units: Units): void;
    setup(): void;
    listAssumptions(): void;
    arcTolerance(inchMode: boolean): number;
  }
}

const pp = Engine.prototype;

/**
 * Settings that depend on the report units: from setup, and again when the first G20/G21 that runs comes before
 * anything has moved and differs from the machine's units (the report units come from what executes).
 */
pp.applyUnits = function (this: Engine, units: Units): void {
  const m = this.machine;
  this.units = units;
  const inch = units === "inch";
  this.progInch = inch;
  this.sc = 1;
  const mmToReport = inch ? 1 / MM_PER_INCH : 1;
  this.mScale = m ? (m.units === units ? 1 : m.units === "mm" ? 1 / MM_PER_INCH : MM_PER_INCH) : 1;
  this.rapidRate = m ? m.rapidRate * this.mScale : 0;
  this.maxFeed = m && m.maxFeed > 0 ? m.maxFeed * this.mScale : Infinity;
  this.accel = m ? m.acceleration * this.mScale : 0;
  this.defaultRapid = !(this.rapidRate > 0);
  if (this.defaultRapid) this.rapidRate = DEFAULT_RAPID_MM * mmToReport;
  this.defaultAccel = !(this.accel > 0);
  if (this.defaultAccel) this.accel = DEFAULT_ACCEL_MM * mmToReport;
  this.safeZ = this.opt.safeZ ?? (m ? m.safeZ * this.mScale : 0);
  this.tol = this.opt.chordTolerance ?? (inch ? 0.0005 : 0.01);
  if (this.feedRaw === this.feedRaw && !this.inverseTime) this.feed = this.feedRaw * this.sc;
};

pp.setup = function (this: Engine): void {
  const m = this.machine;
  if (m) {
    this.maxSpindle = m.maxSpindle > 0 ? m.maxSpindle : Infinity;
    this.tcSeconds = m.toolChangeSeconds;
    this.hMustEqualT = m.hMustEqualT;
    this.spindleControlled = m.spindleProgramControlled;
    this.workOffsetCount = m.workOffsetCount;
  } else this.tcSeconds = DEFAULT_TOOL_CHANGE_S;
  this.applyUnits(m?.units ?? "mm");
  if (this.opt.workOffsets) {
    for (const [key, v] of Object.entries(this.opt.workOffsets)) {
      const num = parseOffsetKey(key);
      if (num < 0 || !v) continue;
      this.origins.set(num, new Float64Array([v.x, v.y, v.z]));
      this.originSource.set(num, "options");
    }
  }
};

/** The defaults the run used, once the report units are settled. */
pp.listAssumptions = function (this: Engine): void {
  const inch = this.units === "inch";
  if (this.defaultRapid) {
    this.assumptions.push(`rapid rate not given: assumed ${fmt(this.rapidRate)} ${inch ? "in" : "mm"}/min (${DEFAULT_RAPID_MM} mm/min)`);
  }
  if (this.defaultAccel) {
    this.assumptions.push(`acceleration not given: assumed ${fmt(this.accel)} ${inch ? "in" : "mm"}/s^2 (${DEFAULT_ACCEL_MM} mm/s^2)`);
  }
  if (!this.machine) this.assumptions.push(`tool change time not given: assumed ${DEFAULT_TOOL_CHANGE_S} s`);
  for (const a of this.assumptions) this.say(R.assumption, "info", 0, a);
};

/** Arc radius tolerance in report units, for the program's current units. */
pp.arcTolerance = function (this: Engine, inchMode: boolean): number {
  if (this.opt.arcTolerance !== undefined) return this.opt.arcTolerance;
  const m = this.machine;
  if (m && m.arcTolerance !== undefined) return m.arcTolerance * this.mScale;
  const mm = inchMode
    ? (this.common ? ARC_TOL_COMMON_IN : ARC_TOL_STRICT_IN) * MM_PER_INCH
    : this.common ? ARC_TOL_COMMON_MM : ARC_TOL_STRICT_MM;
  return this.units === "inch" ? mm / MM_PER_INCH : mm;
};
