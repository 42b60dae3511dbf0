import "server-only";
import { NextResponse } from "next/server";
import { z } from "zod";
import { runAsApiRequest } from "@/lib/auth/api-context";
import { AuthError, RequestError } from "@/lib/auth/errors";

export type JsonError = { error: string; issues?: unknown };

export function jsonError(status: number, error: string, extra?: { issues?: unknown; headers?: Record<string, string> }) {
  const body: JsonError = { error, ...(extra?.issues !== undefined && { issues: extra.issues }) };
  return NextResponse.json(body, { status, headers: extra?.headers });
}

/** Turns what the DAL throws into the right JSON status; anything unexpected is a bare 500. */
export function errorResponse(e: unknown): NextResponse {
  if (e instanceof AuthError) return jsonError(e.status, e.message);
  if (e instanceof RequestError) return jsonError(e.status, e.message, { issues: e.details, headers: e.headers });
  if (e instanceof z.ZodError) return jsonError(422, "Some fields are invalid.", { issues: z.flattenError(e) });
  console.error("unhandled error in route handler:", e);
  return jsonError(500, "Internal error.");
}

type Handler<C> = (req: Request, ctx: C) => Promise<Response>;

/**
 * Wraps a route handler so every failure becomes a JSON error, never a stack trace. Inside it the session lookup
 * also accepts an API token (`Authorization: Bearer ...`); pages and server actions do not.
 */
export function route<C>(handler: Handler<C>): Handler<C> {
  return (req, ctx) =>
    runAsApiRequest(req, async () => {
      try {
        return await handler(req, ctx);
      } catch (e) {
        return errorResponse(e);
      }
    });
}

const MAX_JSON_BYTES = 64 * 1024;

/** Reads a JSON body, checking its type (415), size (413), syntax (400) and shape (422). */
export async function readJson<T extends z.ZodType>(req: Request, schema: T): Promise<z.infer<T>> {
  const type = req.headers.get("content-type") ?? "";
  if (!/^application\/json\b/i.test(type)) throw new RequestError(415, "Send the body as application/json.");
  const length = Number(req.headers.get("content-length") ?? "0");
  if (length > MAX_JSON_BYTES) throw new RequestError(413, "The body is too large.");
  const text = await req.text();
  if (text.length > MAX_JSON_BYTES) throw new RequestError(413, "The body is too large.");
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch {
    throw new RequestError(400, "The body is not valid JSON.");
  }
  const parsed = schema.safeParse(data);
  if (!parsed.success) throw new RequestError(422, "Some fields are invalid.", z.flattenError(parsed.error));
  return parsed.data;
}

/** A positive integer id from a dynamic segment, or 404. */
export function parseId(raw: string): number {
  if (!/^[1-9]\d{0,9}$/.test(raw)) throw new RequestError(404, "Not found.");
  const n = Number(raw);
  if (n > 2_147_483_647) throw new RequestError(404, "Not found.");
  return n;
}
