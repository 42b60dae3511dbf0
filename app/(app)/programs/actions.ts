"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { runAction, type FormState } from "@/lib/actions";
import { authorize } from "@/lib/auth/session";
import { createPart } from "@/lib/dal/parts";
import { createProgram, getProgram, updateProgram } from "@/lib/dal/programs";
import { partCreateSchema, programCreateSchema, programUpdateSchema } from "@/lib/vault-validation";

const text = (fd: FormData, name: string) => {
  const v = fd.get(name);
  return typeof v === "string" ? v : undefined;
};

export async function createPartAction(_prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("writePrograms");
    const input = partCreateSchema.parse({
      number: text(fd, "number") ?? "",
      name: text(fd, "name") ?? "",
      customer: text(fd, "customer"),
      material: text(fd, "material"),
      notes: text(fd, "notes"),
    });
    const part = await createPart(input);
    revalidatePath("/programs/new");
    // The new part comes back selected in the program form.
    return { status: 201, message: `Part ${part.number} added; it is selected below.`, values: { partId: String(part.id) } };
  });
}

export async function createProgramAction(_prev: FormState, fd: FormData): Promise<FormState> {
  let id: number | undefined;
  const state = await runAction(fd, async () => {
    await authorize("writePrograms");
    const input = programCreateSchema.parse({
      programNumber: text(fd, "programNumber") ?? "",
      title: text(fd, "title") ?? "",
      partId: text(fd, "partId") ?? "",
      machineId: text(fd, "machineId") ?? "",
      operation: text(fd, "operation"),
      partsPerCycle: text(fd, "partsPerCycle") || undefined,
      safeZ: text(fd, "safeZ"),
    });
    id = (await createProgram(input)).id;
    return { status: 201 };
  });
  if (state.status !== 201) return state;
  revalidatePath("/programs");
  redirect(`/programs/${id}?created=1`);
}

/** Machine, safe Z, parts per cycle, title, operation; a change of the first three re-checks every revision. */
export async function updateProgramAction(id: number, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("writePrograms");
    const input = programUpdateSchema.parse({
      title: text(fd, "title"),
      operation: text(fd, "operation"),
      machineId: text(fd, "machineId"),
      partsPerCycle: text(fd, "partsPerCycle"),
      // Blank: use the machine's safe Z (null clears the program's own).
      safeZ: (text(fd, "safeZ") ?? "").trim() === "" ? null : text(fd, "safeZ"),
    });
    const before = await getProgram(id);
    if (!before) return { status: 404, message: "No such program." };
    const after = await updateProgram(id, input);
    revalidatePath(`/programs/${id}`);
    const rechecked =
      before.machine.id !== after.machine.id || before.safeZ !== after.safeZ || before.partsPerCycle !== after.partsPerCycle;
    return {
      status: 200,
      message: rechecked ? "Saved. Every revision is being checked again against the new settings." : "Saved.",
    };
  });
}
