import "server-only";
import { and, asc, eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { machines, machineWorkOffsets, users } from "@/db/schema";
import { recordEvent } from "@/lib/audit";
import { RequestError } from "@/lib/auth/errors";
import { authorize, requestIp } from "@/lib/auth/session";

export interface WorkOffsetValue {
  code: string;
  /** Machine coordinates of part zero, in the machine's units. */
  x: number;
  y: number;
  z: number;
  setBy: { id: number; name: string } | null;
  setAt: string;
}

export interface MachineWorkOffsets {
  machine: { id: number; name: string; units: "mm" | "inch" };
  offsets: WorkOffsetValue[];
}

async function machineOf(id: number) {
  const [m] = await db().select({ id: machines.id, name: machines.name, units: machines.units }).from(machines).where(eq(machines.id, id));
  if (!m) throw new RequestError(404, "No such machine.");
  return m;
}

/** The work offset values set at a machine (G54, G55 ...), in code order. */
export async function listWorkOffsets(machineId: number): Promise<MachineWorkOffsets> {
  await authorize("readWorkOffsets");
  const machine = await machineOf(machineId);
  const rows = await db()
    .select({
      code: machineWorkOffsets.code,
      x: machineWorkOffsets.x,
      y: machineWorkOffsets.y,
      z: machineWorkOffsets.z,
      setById: users.id,
      setByName: users.displayName,
      setAt: machineWorkOffsets.setAt,
    })
    .from(machineWorkOffsets)
    .leftJoin(users, eq(users.id, machineWorkOffsets.setBy))
    .where(eq(machineWorkOffsets.machineId, machineId))
    .orderBy(asc(machineWorkOffsets.code));
  return {
    machine,
    offsets: rows.map((r) => ({
      code: r.code,
      x: r.x,
      y: r.y,
      z: r.z,
      setBy: r.setById !== null ? { id: r.setById, name: r.setByName! } : null,
      setAt: r.setAt.toISOString(),
    })),
  };
}

/** Sets (inserts or replaces) one work offset's values at a machine; audited with the old values. */
export async function setWorkOffset(machineId: number, input: { code: string; x: number; y: number; z: number }): Promise<MachineWorkOffsets> {
  const actor = await authorize("setWorkOffsets");
  const ip = await requestIp();
  await machineOf(machineId);
  await db().transaction(async (tx) => {
    const [before] = await tx
      .select({ x: machineWorkOffsets.x, y: machineWorkOffsets.y, z: machineWorkOffsets.z })
      .from(machineWorkOffsets)
      .where(and(eq(machineWorkOffsets.machineId, machineId), eq(machineWorkOffsets.code, input.code)))
      .for("update");
    await tx
      .insert(machineWorkOffsets)
      .values({ machineId, ...input, setBy: actor.id })
      .onConflictDoUpdate({
        target: [machineWorkOffsets.machineId, machineWorkOffsets.code],
        set: { x: input.x, y: input.y, z: input.z, setBy: actor.id, setAt: sql`now()` },
      });
    await recordEvent(
      { actor, action: "work-offset.set", objectType: "machine", objectId: machineId, details: { code: input.code, from: before ?? null, to: { x: input.x, y: input.y, z: input.z } }, ip },
      tx,
    );
  });
  return listWorkOffsets(machineId);
}

/** Clears one work offset at a machine (404 when it was not set). */
export async function clearWorkOffset(machineId: number, code: string): Promise<MachineWorkOffsets> {
  const actor = await authorize("setWorkOffsets");
  const ip = await requestIp();
  await machineOf(machineId);
  await db().transaction(async (tx) => {
    const [gone] = await tx
      .delete(machineWorkOffsets)
      .where(and(eq(machineWorkOffsets.machineId, machineId), eq(machineWorkOffsets.code, code)))
      .returning({ x: machineWorkOffsets.x, y: machineWorkOffsets.y, z: machineWorkOffsets.z });
    if (!gone) throw new RequestError(404, `${code} is not set on this machine.`);
    await recordEvent({ actor, action: "work-offset.clear", objectType: "machine", objectId: machineId, details: { code, from: gone }, ip }, tx);
  });
  return listWorkOffsets(machineId);
}
