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

export interface DemoPart {
  number: string;
  name: string;
  customer: string;
  material: string;
  notes: string;
}

export const DEMO_PARTS: DemoPart[] = [
  {
    number: "FH-2207",
    name: "Sensor bracket",
    customer: "Harrow Lane Instruments",
    material: "6082-T6 aluminium, 12.5 mm plate",
    notes: "Batches of 40. Deburr the four 6.6 holes both sides; anodise clear by the customer's finisher.",
  },
  {
    number: "FH-1184",
    name: "Pump end cover",
    customer: "Brackwater Fluid Systems",
    material: "1.4404 stainless, 90 mm disc",
    notes: "OP10 (turned outside) is bought in. Tapped holes are checked with a go/no-go gauge on every part.",
  },
  {
    number: "FH-3310",
    name: "Fixture base plate",
    customer: "In-house",
    material: "S355 plate 200 x 120 x 20",
    notes: "Carries the two vises for the sensor bracket on bench mill 1.",
  },
  {
    number: "FH-0412",
    name: "Spacer ring",
    customer: "Quillon Marine Fittings",
    material: "Acetal (POM-C) slug, 2.5 in",
    notes: "Customer drawing in inches. Light cuts: the slug moves in the vise above 0.03 in per tooth.",
  },
  {
    number: "FH-5120",
    name: "Handle block",
    customer: "Harrow Lane Instruments",
    material: "7075-T6 block 100 x 35 x 30",
    notes: "Finger grooves follow the customer's sketch, revision B.",
  },
  {
    number: "FH-7002",
    name: "Soft jaw set for the spacer ring",
    customer: "In-house",
    material: "Aluminium soft jaws",
    notes: "",
  },
];

/** One demo revision: a file of db/demo-programs, who uploaded it, and where the workflow left it. */
export interface DemoRevision {
  file: string;
  fileName: string;
  uploadedBy: string;
  note: string;
  daysAgo: number;
  /** Final state; submitted, released and rejected revisions were submitted by their uploader first. */
  status: "draft" | "submitted" | "released" | "rejected";
  submitComment?: string;
  decidedBy?: string;
  decisionComment?: string;
  /** Reasons for waiving error findings, by rule (a release needs one for each error finding). */
  waivers?: Record<string, string>;
}

export interface DemoProgram {
  programNumber: string;
  title: string;
  part: string;
  machine: string;
  operation: string;
  partsPerCycle: number;
  safeZ: number | null;
  revisions: DemoRevision[];
}

const INES = "programmer@cyclegate.test";
const TOMAS = "lead@cyclegate.test";

export const DEMO_PROGRAMS: DemoProgram[] = [
  {
    programNumber: "O2207",
    title: "Sensor bracket, two per cycle",
    part: "FH-2207",
    machine: "Bench mill 1",
    operation: "OP10 both vises",
    partsPerCycle: 2,
    safeZ: null,
    revisions: [
      {
        file: "o2207-sensor-bracket-r1.nc",
        fileName: "O2207_sensor_bracket.nc",
        uploadedBy: INES,
        note: "Both vises, ordered by tool so each manual change happens once per cycle.",
        daysAgo: 12,
        status: "released",
        submitComment: "Dry run done on vise 1 with the spindle off.",
        decidedBy: TOMAS,
        decisionComment: "Proved out on the first pair in both vises; released for the batch of 40.",
      },
    ],
  },
  {
    programNumber: "O1184",
    title: "Pump end cover, bore side",
    part: "FH-1184",
    machine: "Vertical centre 2",
    operation: "OP20 bore side",
    partsPerCycle: 1,
    safeZ: null,
    revisions: [
      {
        file: "o1184-pump-end-cover-r1.nc",
        fileName: "O1184.nc",
        uploadedBy: INES,
        note: "First release for the spring order.",
        daysAgo: 30,
        status: "released",
        submitComment: "Taps checked against the customer's thread depth.",
        decidedBy: TOMAS,
        decisionComment: "Good. Released.",
      },
      {
        file: "o1184-pump-end-cover-r2.nc",
        fileName: "O1184 rev2.nc",
        uploadedBy: INES,
        note: "Slower helix on the bore (chatter on part 3 of the last batch); chamfer tool added.",
        daysAgo: 9,
        status: "released",
        submitComment: "Chamfer added at the customer's request.",
        decidedBy: TOMAS,
        decisionComment: "Chatter gone on the trial part. Released; revision 1 is withdrawn from the floor.",
      },
    ],
  },
  {
    programNumber: "O3310",
    title: "Fixture base plate, back side",
    part: "FH-3310",
    machine: "Vertical centre 2",
    operation: "OP20 back side",
    partsPerCycle: 1,
    safeZ: null,
    revisions: [
      {
        file: "o3310-fixture-base-r1.nc",
        fileName: "O3310-base-plate-op20.nc",
        uploadedBy: INES,
        note: "Long-reach T7 for deburring inside the slots.",
        daysAgo: 6,
        status: "released",
        submitComment: "The H17 on T7 is on purpose: see the header.",
        decidedBy: TOMAS,
        decisionComment: "Released with the length offset waiver; rapids into the open slots checked on the dry run.",
        waivers: {
          "length-offset-mismatch":
            "T7 sits in the long-reach holder, whose length is kept under H17 on this control. Checked the offset page at the machine before release.",
        },
      },
      {
        file: "o3310-fixture-base-r2.nc",
        fileName: "O3310-base-plate-op20-r2.nc",
        uploadedBy: INES,
        note: "Pocket moved 20 mm towards X+ so the new key of vise 2 clears it; slots and holes unchanged.",
        daysAgo: 1,
        status: "submitted",
        submitComment: "Only the pocket moved: please compare with revision 1 in the 3D view before release.",
      },
    ],
  },
  {
    programNumber: "O0412",
    title: "Spacer ring",
    part: "FH-0412",
    machine: "Vertical centre 2",
    operation: "OP10 complete",
    partsPerCycle: 1,
    safeZ: 0.1,
    revisions: [
      {
        file: "o0412-spacer-ring-r1.nc",
        fileName: "o0412.nc",
        uploadedBy: INES,
        note: "",
        daysAgo: 5,
        status: "rejected",
        submitComment: "First go at the ring.",
        decidedBy: TOMAS,
        decisionComment:
          "The .201 drill goes to Z-.95: through the .600 slug and the .250 parallels into the vise floor. Stop at .72 and say where the parallels go.",
      },
      {
        file: "o0412-spacer-ring-r2.nc",
        fileName: "o0412-r2.nc",
        uploadedBy: INES,
        note: "Drill depth .72 as asked; finish pass on the OD.",
        daysAgo: 2,
        status: "draft",
      },
    ],
  },
  {
    programNumber: "O5120",
    title: "Handle block",
    part: "FH-5120",
    machine: "Vertical centre 2",
    operation: "OP10",
    partsPerCycle: 1,
    safeZ: null,
    revisions: [
      {
        file: "o5120-handle-block-r1.nc",
        fileName: "O5120_handle_block.nc",
        uploadedBy: INES,
        note: "Optional stop before the last tool change to blow chips out of the grooves.",
        daysAgo: 1,
        status: "submitted",
        submitComment: "Ready for review: first run of the handle block, grooves per sketch rev B.",
      },
    ],
  },
  {
    programNumber: "O7002",
    title: "Soft jaws for the spacer ring",
    part: "FH-7002",
    machine: "Bench mill 1",
    operation: "Jaw boring",
    partsPerCycle: 1,
    safeZ: null,
    revisions: [
      {
        file: "o7002-clamp-jaw-r1.nc",
        fileName: "O7002 soft jaws.nc",
        uploadedBy: INES,
        note: "Not proven yet.",
        daysAgo: 0,
        status: "draft",
      },
    ],
  },
];

/**
 * Work offsets set at the demo machines (machine coordinates of part zero, the machine's units), by the lead, this many
 * days ago: the vises and the fixture plate stay where they are bolted.
 */
export const DEMO_WORK_OFFSETS: { machine: string; code: string; x: number; y: number; z: number; daysAgo: number }[] = [
  { machine: "Bench mill 1", code: "G54", x: -262.415, y: -118.07, z: -196.33, daysAgo: 34 },
  { machine: "Bench mill 1", code: "G55", x: -152.38, y: -118.105, z: -196.41, daysAgo: 34 },
  { machine: "Vertical centre 2", code: "G54", x: -381.2, y: -203.455, z: -402.118, daysAgo: 33 },
  { machine: "Vertical centre 2", code: "G55", x: -561.04, y: -203.5, z: -402.12, daysAgo: 33 },
];

/** A run signed off at the machine: which revision (released at the time), who, when, how many parts. */
export interface DemoRun {
  programNumber: string;
  revision: number;
  by: string;
  /** Days (and fractions) before the seed. */
  daysAgo: number;
  quantity: number | null;
}

const KOFI = "operator@cyclegate.test";

/** Past runs, oldest first; each after its revision's release (and, for O1184 revision 1, before its supersession). */
export const DEMO_RUNS: DemoRun[] = [
  { programNumber: "O1184", revision: 1, by: KOFI, daysAgo: 27.3, quantity: 12 },
  { programNumber: "O1184", revision: 1, by: KOFI, daysAgo: 20.4, quantity: 12 },
  // The two-vise bracket on the hand-changed bench mill: two parts per cycle, the batch of 40 in two runs.
  { programNumber: "O2207", revision: 1, by: KOFI, daysAgo: 10.7, quantity: 20 },
  { programNumber: "O1184", revision: 2, by: KOFI, daysAgo: 8.3, quantity: 15 },
  // The lead runs the first fixture plate himself, the operator the rest.
  { programNumber: "O3310", revision: 1, by: TOMAS, daysAgo: 5.2, quantity: 1 },
  { programNumber: "O3310", revision: 1, by: KOFI, daysAgo: 4.3, quantity: 3 },
  { programNumber: "O2207", revision: 1, by: KOFI, daysAgo: 2.6, quantity: 20 },
];
