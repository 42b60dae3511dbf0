"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { actionId, runAction, type FormState } from "@/lib/actions";
import { authorize } from "@/lib/auth/session";
import { createMachine, updateMachine } from "@/lib/dal/machines";
import { formBoolean, machineSchema } from "@/lib/validation";

const NUMBER_FIELDS = [
  "travelXMin", "travelXMax", "travelYMin", "travelYMax", "travelZMin", "travelZMax",
  "rapidRate", "maxFeed", "maxSpindle", "acceleration", "toolChangeSeconds", "safeZ", "workOffsetCount",
] as const;

function machineFromForm(fd: FormData) {
  const raw: Record<string, unknown> = {
    name: fd.get("name") ?? "",
    notes: fd.get("notes") ?? "",
    units: fd.get("units") ?? "",
    manualToolChange: formBoolean(fd, "manualToolChange"),
    spindleProgramControlled: formBoolean(fd, "spindleProgramControlled"),
    hMustEqualT: formBoolean(fd, "hMustEqualT"),
  };
  for (const f of NUMBER_FIELDS) {
    const v = fd.get(f);
    // A blank box is "missing", not 0.
    raw[f] = typeof v === "string" && v.trim() !== "" ? v.trim() : undefined;
  }
  return machineSchema.parse(raw);
}

export async function createMachineAction(_prev: FormState, fd: FormData): Promise<FormState> {
  let id: number | undefined;
  const state = await runAction(fd, async () => {
    await authorize("manageMachines");
    id = (await createMachine(machineFromForm(fd))).id;
    return { status: 201, message: "Machine added." };
  });
  if (state.status !== 201) return state;
  revalidatePath("/machines");
  redirect(`/machines?added=${id}`);
}

export async function updateMachineAction(id: unknown, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("manageMachines");
    const m = await updateMachine(actionId(id), machineFromForm(fd));
    revalidatePath("/machines");
    return { status: 200, message: `Saved ${m.name}.` };
  });
}
