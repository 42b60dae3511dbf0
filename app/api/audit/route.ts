import { NextResponse } from "next/server";
import { z } from "zod";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { auditFilterSchema, listAuditEvents } from "@/lib/dal/audit";
import { route } from "@/lib/http";

export const dynamic = "force-dynamic";

export const GET = route(async (req) => {
  await authorize("readAudit");
  const params = Object.fromEntries(new URL(req.url).searchParams);
  const parsed = auditFilterSchema.safeParse(params);
  if (!parsed.success) throw new RequestError(422, "Some filters are invalid.", z.flattenError(parsed.error));
  return NextResponse.json(await listAuditEvents(parsed.data));
});
