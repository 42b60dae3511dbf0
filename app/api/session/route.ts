import { NextResponse } from "next/server";
import { signIn, signOut } from "@/lib/auth/sign-in";
import { requireUser } from "@/lib/auth/session";
import { jsonError, readJson, route } from "@/lib/http";
import { signInSchema } from "@/lib/validation";

export const dynamic = "force-dynamic";

export const GET = route(async () => {
  const user = await requireUser();
  return NextResponse.json({ user: { email: user.email, name: user.name, role: user.role } });
});

export const POST = route(async (req) => {
  const { email, password } = await readJson(req, signInSchema);
  const result = await signIn(email, password);
  if (result.ok) return NextResponse.json({ user: result.user });
  if (result.status === 429) {
    return jsonError(429, result.message, { headers: { "Retry-After": String(result.retryAfter) } });
  }
  return jsonError(401, result.message);
});

export const DELETE = route(async () => {
  await requireUser();
  await signOut();
  return NextResponse.json({ ok: true });
});
