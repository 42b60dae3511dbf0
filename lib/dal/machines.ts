import "server-only";
import { asc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { machines, type Machine } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { isUniqueViolation } from "@/lib/db-errors";
import { RequestError } from "@/lib/auth/errors";
import { authorize, requestIp } from "@/lib/auth/session";
import type { MachineInput } from "@/lib/validation";

export type MachineView = MachineInput & { id: number; updatedAt: string };

const columns = {
  id: machines.id,
  name: machines.name,
  notes: machines.notes,
  units: machines.units,
  travelXMin: machines.travelXMin,
  travelXMax: machines.travelXMax,
  travelYMin: machines.travelYMin,
  travelYMax: machines.travelYMax,
  travelZMin: machines.travelZMin,
  travelZMax: machines.travelZMax,
  rapidRate: machines.rapidRate,
  maxFeed: machines.maxFeed,
  maxSpindle: machines.maxSpindle,
  acceleration: machines.acceleration,
  toolChangeSeconds: machines.toolChangeSeconds,
  manualToolChange: machines.manualToolChange,
  spindleProgramControlled: machines.spindleProgramControlled,
  hMustEqualT: machines.hMustEqualT,
  safeZ: machines.safeZ,
  workOffsetCount: machines.workOffsetCount,
  dialect: machines.dialect,
  arcTolerance: machines.arcTolerance,
  updatedAt: machines.updatedAt,
};

const toView = (r: Omit<Machine, "createdAt">): MachineView => ({ ...r, updatedAt: r.updatedAt.toISOString() });

export async function listMachines(): Promise<MachineView[]> {
  await authorize("readMachines");
  const rows = await db().select(columns).from(machines).orderBy(asc(machines.name));
  return rows.map(toView);
}

export async function getMachine(id: number): Promise<MachineView | null> {
  await authorize("readMachines");
  const [row] = await db().select(columns).from(machines).where(eq(machines.id, id)).limit(1);
  return row ? toView(row) : null;
}

const nameTaken = () =>
  new RequestError(409, "A machine with this name already exists.", { name: ["A machine with this name already exists."] });


export async function createMachine(input: MachineInput): Promise<MachineView> {
  const actor = await authorize("manageMachines");
  const ip = await requestIp();
  try {
    return await db().transaction(async (tx) => {
      const [row] = await tx.insert(machines).values(input).returning(columns);
      if (!row) throw new Error("insert returned nothing");
      await recordEvent({ actor, action: "machine.create", objectType: "machine", objectId: row.id, details: { name: row.name }, ip }, tx);
      return toView(row);
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw nameTaken();
    throw e;
  }
}

export async function updateMachine(id: number, input: MachineInput): Promise<MachineView> {
  const actor = await authorize("manageMachines");
  const ip = await requestIp();
  try {
    return await db().transaction(async (tx) => {
      const [before] = await tx.select(columns).from(machines).where(eq(machines.id, id)).for("update");
      if (!before) throw new RequestError(404, "No such machine.");
      const [row] = await tx
        .update(machines)
        .set({ ...input, updatedAt: sql`now()` })
        .where(eq(machines.id, id))
        .returning(columns);
      if (!row) throw new RequestError(404, "No such machine.");
      const changed: Record<string, { from: unknown; to: unknown }> = {};
      for (const key of Object.keys(input) as (keyof MachineInput)[]) {
        if (before[key] !== row[key]) changed[key] = { from: before[key], to: row[key] };
      }
      await recordEvent({ actor, action: "machine.update", objectType: "machine", objectId: id, details: { name: row.name, changed }, ip }, tx);
      return toView(row);
    });
  } catch (e) {
    if (isUniqueViolation(e)) throw nameTaken();
    throw e;
  }
}
