import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { createMachine, listMachines } from "@/lib/dal/machines";
import { readJson, route } from "@/lib/http";
import { machineSchema } from "@/lib/validation";

export const dynamic = "force-dynamic";

export const GET = route(async () => NextResponse.json({ machines: await listMachines() }));

export const POST = route(async (req) => {
  // Authorise before reading the body, so a stranger learns nothing from validation messages.
  await authorize("manageMachines");
  const input = await readJson(req, machineSchema);
  return NextResponse.json({ machine: await createMachine(input) }, { status: 201 });
});
