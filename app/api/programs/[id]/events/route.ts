import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { listProgramEvents } from "@/lib/dal/programs";
import { parseId, route } from "@/lib/http";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

export const GET = route<Ctx>(async (_req, { params }) => {
  await authorize("readPrograms");
  return NextResponse.json({ events: await listProgramEvents(parseId((await params).id)) });
});
