import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { rejectRevision } from "@/lib/dal/workflow";
import { parseId, readJson, route } from "@/lib/http";
import { rejectSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** Body: { comment }. */
export const POST = route<Ctx>(async (req, { params }) => {
  await authorize("reviewRevisions");
  const id = parseId((await params).id);
  const { comment } = await readJson(req, rejectSchema);
  return NextResponse.json({ revision: await rejectRevision(id, comment) });
});
