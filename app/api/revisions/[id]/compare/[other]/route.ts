import { NextResponse } from "next/server";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { compareRevisions } from "@/lib/dal/revisions";
import { parseId, route } from "@/lib/http";
import { readQuery } from "@/lib/http-query";
import { compareQuerySchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string; other: string }> };

/** Revision {id} (old) against {other} (new): line diff with line numbers and analysis diff. `?context=N` lines. */
export const GET = route<Ctx>(async (req, { params }) => {
  await authorize("readPrograms");
  const p = await params;
  const { context } = readQuery(req, compareQuerySchema);
  const comparison = await compareRevisions(parseId(p.id), parseId(p.other), { context });
  if (!comparison) throw new RequestError(404, "No such revision.");
  return NextResponse.json(comparison);
});
