import { NextResponse } from "next/server";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { deleteDraft, getRevision } from "@/lib/dal/revisions";
import { parseId, route } from "@/lib/http";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** Metadata, analysis summary and state, findings, tools, offsets, signatures; `?result=1` adds the engine's JSON. */
export const GET = route<Ctx>(async (req, { params }) => {
  await authorize("readPrograms");
  const withResult = new URL(req.url).searchParams.get("result") === "1";
  const revision = await getRevision(parseId((await params).id), { withResult });
  if (!revision) throw new RequestError(404, "No such revision.");
  return NextResponse.json({ revision });
});

/** Deletes a draft (its uploader or an admin). */
export const DELETE = route<Ctx>(async (_req, { params }) => {
  await authorize("deleteDrafts");
  await deleteDraft(parseId((await params).id));
  return NextResponse.json({ ok: true });
});
