import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { revokeToken } from "@/lib/dal/tokens";
import { parseId, route } from "@/lib/http";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/** Revokes one of the caller's tokens. */
export const DELETE = route<Ctx>(async (_req, { params }) => {
  await authorize("manageOwnTokens");
  return NextResponse.json({ token: await revokeToken(parseId((await params).id)) });
});
