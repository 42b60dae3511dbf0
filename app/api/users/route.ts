import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { createUser, listUsers } from "@/lib/dal/users";
import { readJson, route } from "@/lib/http";
import { userCreateSchema } from "@/lib/validation";

export const dynamic = "force-dynamic";

export const GET = route(async () => NextResponse.json({ users: await listUsers() }));

export const POST = route(async (req) => {
  await authorize("manageUsers");
  const input = await readJson(req, userCreateSchema);
  return NextResponse.json({ user: await createUser(input) }, { status: 201 });
});
