import { NextResponse } from "next/server";
import { authorize } from "@/lib/auth/session";
import { listOutbox } from "@/lib/dal/outbox";
import { route } from "@/lib/http";
import { readQuery } from "@/lib/http-query";
import { outboxListSchema } from "@/lib/vault-validation";

export const dynamic = "force-dynamic";

/** `?state=pending|sending|sent|failed&page=N`. */
export const GET = route(async (req) => {
  await authorize("readOutbox");
  return NextResponse.json(await listOutbox(readQuery(req, outboxListSchema)));
});
