import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { clearWorkOffset, listWorkOffsets, setWorkOffset } from "@/lib/dal/work-offsets";
import { parseId, readJson, route } from "@/lib/http";
import { readQuery } from "@/lib/http-query";
import { workOffsetClearSchema, workOffsetSetSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, { params }) => {
  await authorize("readWorkOffsets");
  return NextResponse.json(await listWorkOffsets(parseId((await params).id)));
});

/** Body: { code: "G54", x, y, z } in the machine's units (machine coordinates of part zero). */
export const PUT = route<Ctx>(async (req, { params }) => {
  await authorize("setWorkOffsets");
  const id = parseId((await params).id);
  const input = await readJson(req, workOffsetSetSchema);
  return NextResponse.json(await setWorkOffset(id, input));
});

/** `?code=G54`. */
export const DELETE = route<Ctx>(async (req, { params }) => {
  await authorize("setWorkOffsets");
  const id = parseId((await params).id);
  const { code } = readQuery(req, workOffsetClearSchema);
  return NextResponse.json(await clearWorkOffset(id, code));
});
