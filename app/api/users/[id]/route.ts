import { NextResponse } from "next/server";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { getUser, updateUser } from "@/lib/dal/users";
import { parseId, readJson, route } from "@/lib/http";
import { userUpdateSchema } from "@/lib/validation";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, { params }) => {
  await authorize("manageUsers");
  const user = await getUser(parseId((await params).id));
  if (!user) throw new RequestError(404, "No such user.");
  return NextResponse.json({ user });
});

export const PATCH = route<Ctx>(async (req, { params }) => {
  await authorize("manageUsers");
  const id = parseId((await params).id);
  const change = await readJson(req, userUpdateSchema);
  return NextResponse.json({ user: await updateUser(id, change) });
});
