"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { actionId, runAction, type FormState } from "@/lib/actions";
import { authorize } from "@/lib/auth/session";
import { signOffRun } from "@/lib/dal/runs";
import { runSignOffSchema } from "@/lib/vault-validation";

const text = (fd: FormData, name: string) => {
  const v = fd.get(name);
  return typeof v === "string" ? v : "";
};

/**
 * The run page's form: `identity`, one `offset` per work offset and one `tool` per tool ticked, `dryRun`, `quantity`,
 * `password`, `sha256`, and `shown.<code>` (when the value shown for that offset was recorded, blank when none was).
 */
function signOffInput(fd: FormData) {
  const shown: { code: string; setAt: string | null }[] = [];
  for (const [key, value] of fd.entries()) {
    if (key.startsWith("shown.") && typeof value === "string") shown.push({ code: key.slice(6), setAt: value || null });
  }
  const all = (name: string) => fd.getAll(name).filter((v): v is string => typeof v === "string");
  return runSignOffSchema.parse({
    password: text(fd, "password"),
    sha256: text(fd, "sha256"),
    identity: text(fd, "identity") === "on",
    offsets: all("offset"),
    tools: all("tool"),
    dryRun: text(fd, "dryRun") === "on",
    quantity: text(fd, "quantity"),
    shown,
  });
}

/** An operator or a lead signs off a run of a released revision; then the run page shows what was recorded. */
export async function signOffRunAction(rawId: unknown, _prev: FormState, fd: FormData): Promise<FormState> {
  let signed: { revisionId: number; runId: number } | null = null;
  const state = await runAction(fd, async () => {
    await authorize("signOffRuns");
    const revisionId = actionId(rawId);
    const run = await signOffRun(revisionId, signOffInput(fd));
    signed = { revisionId, runId: run.id };
    revalidatePath("/runs");
    revalidatePath(`/programs/${run.program.id}`);
    revalidatePath("/");
    return { status: 200 };
  });
  if (state.status !== 200 || !signed) return state;
  const { revisionId, runId } = signed as { revisionId: number; runId: number };
  redirect(`/revisions/${revisionId}/run?signed=${runId}`);
}
