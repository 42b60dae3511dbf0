import { NextResponse } from "next/server";
import { z } from "zod";
import { authorize } from "@/lib/auth/session";
import { createPart, listParts } from "@/lib/dal/parts";
import { readJson, route } from "@/lib/http";
import { readQuery } from "@/lib/http-query";
import { partCreateSchema, singleLine } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

const querySchema = z.object({ q: singleLine("a search", 100, 0).optional() });

export const GET = route(async (req) => {
  await authorize("readPrograms");
  const { q } = readQuery(req, querySchema);
  return NextResponse.json({ parts: await listParts(q || undefined) });
});

export const POST = route(async (req) => {
  await authorize("writePrograms");
  const input = await readJson(req, partCreateSchema);
  return NextResponse.json({ part: await createPart(input) }, { status: 201 });
});
