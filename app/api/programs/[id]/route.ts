import { NextResponse } from "next/server";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { getProgram, updateProgram } from "@/lib/dal/programs";
import { parseId, readJson, route } from "@/lib/http";
import { programUpdateSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, { params }) => {
  await authorize("readPrograms");
  const program = await getProgram(parseId((await params).id));
  if (!program) throw new RequestError(404, "No such program.");
  return NextResponse.json({ program });
});

export const PATCH = route<Ctx>(async (req, { params }) => {
  await authorize("writePrograms");
  const id = parseId((await params).id);
  const input = await readJson(req, programUpdateSchema);
  return NextResponse.json({ program: await updateProgram(id, input) });
});
