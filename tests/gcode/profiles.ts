/**
 * Machine profiles for the engine tests: a metric vertical machining centre in the demo shop's style, and changes of
 * it. Invented test machines (the limits are plausible, not any real machine's).
 */
import type { MachineProfile } from "../../lib/gcode/types";

/** A metric machine with the travel below machine zero, as on most small mills; `over` replaces fields. */
export function testMachine(over: Partial<MachineProfile> = {}): MachineProfile {
  return {
    units: "mm",
    travel: { x: { min: -500, max: 0 }, y: { min: -400, max: 0 }, z: { min: -400, max: 0 } },
    rapidRate: 20000,
    maxFeed: 10000,
    maxSpindle: 12000,
    acceleration: 1000,
    toolChangeSeconds: 5,
    manualToolChange: false,
    spindleProgramControlled: true,
    hMustEqualT: true,
    safeZ: 0,
    workOffsetCount: 6,
    ...over,
  };
}

/** The same machine in inches. */
export function testInchMachine(over: Partial<MachineProfile> = {}): MachineProfile {
  return testMachine({
    units: "inch",
    travel: { x: { min: -30, max: 0 }, y: { min: -16, max: 0 }, z: { min: -20, max: 0 } },
    rapidRate: 945,
    maxFeed: 400,
    acceleration: 100,
    safeZ: 0.1,
    ...over,
  });
}
