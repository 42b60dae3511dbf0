import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { signOffRun } from "@/lib/dal/runs";
import { parseId, readJson, route } from "@/lib/http";
import { runSignOffSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** Body: { password, sha256, identity, offsets: ["G54"], tools: [1], dryRun, quantity?, shown? }. */
export const POST = route<Ctx>(async (req, { params }) => {
  await authorize("signOffRuns");
  const id = parseId((await params).id);
  const input = await readJson(req, runSignOffSchema);
  return NextResponse.json({ run: await signOffRun(id, input) }, { status: 201 });
});
