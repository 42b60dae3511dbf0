"use server";

import { revalidatePath } from "next/cache";
import { runAction, type FormState } from "@/lib/actions";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { clearWorkOffset, setWorkOffset } from "@/lib/dal/work-offsets";
import { workOffsetClearSchema, workOffsetSetSchema } from "@/lib/vault-validation";

const text = (fd: FormData, name: string) => {
  const v = fd.get(name);
  return typeof v === "string" ? v.trim() : "";
};
/** A blank box is missing, not 0. */
const num = (fd: FormData, name: string) => {
  const v = text(fd, name);
  return v === "" ? undefined : Number(v.replace(",", "."));
};

/** Records where part zero of a work offset sits at the machine (operators, leads, admins). */
export async function setWorkOffsetAction(machineId: number, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("setWorkOffsets");
    const parsed = workOffsetSetSchema.safeParse({ code: text(fd, "code"), x: num(fd, "x"), y: num(fd, "y"), z: num(fd, "z") });
    if (!parsed.success) {
      const fieldErrors: Record<string, string[]> = {};
      for (const i of parsed.error.issues) {
        const f = String(i.path[0] ?? "code");
        (fieldErrors[f] ??= []).push(f === "code" ? "A work offset such as G54, G59.1 or G54.1 P3." : "Enter a number.");
      }
      throw new RequestError(422, "Some fields need attention.", { fieldErrors });
    }
    await setWorkOffset(machineId, parsed.data);
    revalidatePath(`/machines/${machineId}`);
    return { status: 200, message: `${parsed.data.code} saved.` };
  });
}

/** Forgets a work offset's values at the machine. */
export async function clearWorkOffsetAction(machineId: number, _prev: FormState, fd: FormData): Promise<FormState> {
  return runAction(fd, async () => {
    await authorize("setWorkOffsets");
    const { code } = workOffsetClearSchema.parse({ code: text(fd, "code") });
    await clearWorkOffset(machineId, code);
    revalidatePath(`/machines/${machineId}`);
    return { status: 200, message: `${code} cleared.` };
  });
}

