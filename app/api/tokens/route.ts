import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { createToken, listMyTokens } from "@/lib/dal/tokens";
import { readJson, route } from "@/lib/http";
import { tokenCreateSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  await authorize("manageOwnTokens");
  return NextResponse.json({ tokens: await listMyTokens() });
});

/** Body: { name }. The answer holds the token once (`token`); only its hash is kept. */
export const POST = route(async (req) => {
  await authorize("manageOwnTokens");
  const { name } = await readJson(req, tokenCreateSchema);
  return NextResponse.json({ token: await createToken(name) }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
