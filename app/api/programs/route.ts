import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { createProgram, listPrograms } from "@/lib/dal/programs";
import { readJson, route } from "@/lib/http";
import { readQuery } from "@/lib/http-query";
import { programCreateSchema, programListSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  await authorize("readPrograms");
  return NextResponse.json(await listPrograms(readQuery(req, programListSchema)));
});

export const POST = route(async (req) => {
  await authorize("writePrograms");
  const input = await readJson(req, programCreateSchema);
  return NextResponse.json({ program: await createProgram(input) }, { status: 201 });
});
