import { NextResponse } from "next/server";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { getMachine, updateMachine } from "@/lib/dal/machines";
import { parseId, readJson, route } from "@/lib/http";
import { machineSchema } from "@/lib/validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, { params }) => {
  await authorize("readMachines");
  const machine = await getMachine(parseId((await params).id));
  if (!machine) throw new RequestError(404, "No such machine.");
  return NextResponse.json({ machine });
});

export const PUT = route<Ctx>(async (req, { params }) => {
  await authorize("manageMachines");
  const id = parseId((await params).id);
  const input = await readJson(req, machineSchema);
  return NextResponse.json({ machine: await updateMachine(id, input) });
});
