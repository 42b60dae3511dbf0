import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { submitRevision } from "@/lib/dal/workflow";
import { parseId, readJson, route } from "@/lib/http";
import { submitSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** Body (optional): { comment }. */
export const POST = route<Ctx>(async (req, { params }) => {
  await authorize("writePrograms");
  const id = parseId((await params).id);
  const { comment } = req.headers.get("content-length") === "0" || !req.body ? { comment: "" } : await readJson(req, submitSchema);
  return NextResponse.json({ revision: await submitRevision(id, comment) });
});
