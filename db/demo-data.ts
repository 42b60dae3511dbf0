import type { NewMachine, Role } from "./schema";

/** An invented shop for the demo: Fernhollow Precision, a four-person job shop. */
export const DEMO_SHOP = "Fernhollow Precision";

export const DEMO_USERS: { email: string; displayName: string; role: Role }[] = [
  { email: "admin@cyclegate.test", displayName: "Noor Abernethy", role: "admin" },
  { email: "lead@cyclegate.test", displayName: "Tomas Veldkamp", role: "lead" },
  { email: "programmer@cyclegate.test", displayName: "Ines Marchetti", role: "programmer" },
  { email: "operator@cyclegate.test", displayName: "Kofi Lindqvist", role: "operator" },
];

/** Machine coordinates run negative from the home position at 0, as on most small mills (common practice). */
export const DEMO_MACHINES: NewMachine[] = [
  {
    name: "Bench mill 1",
    notes: "Small 3-axis knee-less mill in bay A. Tools are changed by hand; the spindle is switched at the head.",
    units: "mm",
    travelXMin: -305,
    travelXMax: 0,
    travelYMin: -160,
    travelYMax: 0,
    travelZMin: -280,
    travelZMax: 0,
    rapidRate: 2_500,
    maxFeed: 1_500,
    maxSpindle: 5_000,
    acceleration: 250,
    toolChangeSeconds: 45,
    manualToolChange: true,
    spindleProgramControlled: false,
    hMustEqualT: true,
    safeZ: 2,
    workOffsetCount: 6,
    dialect: "common",
    // a hand-fed mill's control with a looser arc check than the usual default (machine units: mm)
    arcTolerance: 0.05,
  },
  {
    name: "Vertical centre 2",
    notes: "Larger vertical machining centre in bay B with a 20-pocket tool changer.",
    units: "mm",
    travelXMin: -762,
    travelXMax: 0,
    travelYMin: -406,
    travelYMax: 0,
    travelZMin: -508,
    travelZMax: 0,
    rapidRate: 24_000,
    maxFeed: 10_000,
    maxSpindle: 8_100,
    acceleration: 2_500,
    toolChangeSeconds: 4.5,
    manualToolChange: false,
    spindleProgramControlled: true,
    hMustEqualT: true,
    safeZ: 2,
    workOffsetCount: 54,
    dialect: "common",
    arcTolerance: null,
  },
];
