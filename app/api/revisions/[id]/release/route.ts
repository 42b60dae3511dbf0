import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { releaseRevision } from "@/lib/dal/workflow";
import { parseId, readJson, route } from "@/lib/http";
import { releaseSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** Body: { password, comment, waivers?: [{ rule, line, reason }] }. */
export const POST = route<Ctx>(async (req, { params }) => {
  await authorize("reviewRevisions");
  const id = parseId((await params).id);
  const input = await readJson(req, releaseSchema);
  return NextResponse.json({ revision: await releaseRevision(id, input) });
});
