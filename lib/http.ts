import "server-only";
import { NextResponse } from "next/server";
import { z } from "zod";
import { runAsApiRequest } from "@/lib/auth/api-context";
import { AuthError, RequestError } from "@/lib/auth/errors";
import { formatBytes } from "@/lib/request-gate";
import { positiveIdFromText } from "@/lib/validation";

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

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Whether a request that changes something came from a page of another origin. The session cookie is SameSite=Lax,
 * which keeps other sites out but not another port or app on this same host (same site, other origin): a plain
 * form or a simple fetch from there could upload a program or sign someone in with the cookie riding along. So a
 * write must come from the app's own pages (Sec-Fetch-Site same-origin, or an Origin whose host is the one asked)
 * or carry no browser marks at all (curl, a CAM post), or authenticate with an API token, which no page can attach
 * without the app's consent.
 */
export function crossOriginWrite(req: Request): boolean {
  if (SAFE_METHODS.has(req.method.toUpperCase())) return false;
  if (/^Bearer\s/i.test(req.headers.get("authorization") ?? "")) return false;
  const site = req.headers.get("sec-fetch-site");
  if (site !== null && site !== "same-origin" && site !== "none") return true;
  const origin = req.headers.get("origin");
  if (origin === null) return false;
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host");
  try {
    return origin === "null" || new URL(origin).host !== host;
  } catch {
    return true;
  }
}

/**
 * Wraps a route handler so every failure becomes a JSON error, never a stack trace. Inside it the session lookup
 * also accepts an API token (`Authorization: Bearer ...`); pages and server actions do not. A write from a page of
 * another origin is refused first (see crossOriginWrite).
 */
export function route<C>(handler: Handler<C>): Handler<C> {
  return (req, ctx) =>
    runAsApiRequest(req, async () => {
      if (crossOriginWrite(req)) return jsonError(403, "Requests that change data must come from Cyclegate's own pages.");
      try {
        return await handler(req, ctx);
      } catch (e) {
        return errorResponse(e);
      }
    });
}

/** The largest JSON body a route reads by default. */
export const MAX_JSON_BYTES = 64 * 1024;

const TOKEN = "[!#$%&'*+.^_`|~0-9A-Za-z-]+";
const MEDIA_PARAMETER = new RegExp(`^\\s*${TOKEN}=(?:${TOKEN}|"[^"\\\\]*")\\s*$`);

/**
 * True for "application/json" itself, any case, with optional well-formed parameters
 * ("application/json; charset=utf-8"). Not "application/json-patch+json", "text/json" or "application/json;".
 */
export function isJsonMediaType(header: string | null): boolean {
  if (!header) return false;
  const [type, ...params] = header.split(";");
  return type!.trim().toLowerCase() === "application/json" && params.every((p) => MEDIA_PARAMETER.test(p));
}

/**
 * The request body as bytes, refusing with 413 as soon as it passes `maxBytes`, whether or not
 * the client sent a Content-Length (a chunked body is counted as it arrives, never buffered whole).
 */
export async function readBodyBytes(req: Request, maxBytes: number): Promise<Uint8Array> {
  const tooLarge = () => new RequestError(413, `The body is too large (at most ${formatBytes(maxBytes)}).`);
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > maxBytes) throw tooLarge();
  if (!req.body) return new Uint8Array(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel();
      throw tooLarge();
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

/** Reads a JSON body, checking its type (415), size (413), syntax and encoding (400) and shape (422). */
export async function readJson<T extends z.ZodType>(req: Request, schema: T, maxBytes = MAX_JSON_BYTES): Promise<z.infer<T>> {
  if (!isJsonMediaType(req.headers.get("content-type"))) throw new RequestError(415, "Send the body as application/json.");
  const bytes = await readBodyBytes(req, maxBytes);
  let data: unknown;
  try {
    data = JSON.parse(new TextDecoder("utf-8", { fatal: true }).decode(bytes));
  } catch {
    throw new RequestError(400, "The body is not valid JSON.");
  }
  const parsed = schema.safeParse(data);
  if (!parsed.success) throw new RequestError(422, "Some fields are invalid.", z.flattenError(parsed.error));
  return parsed.data;
}

/** A positive integer id from a dynamic segment, or 404. */
export function parseId(raw: string): number {
  const id = positiveIdFromText(raw);
  if (id === null) throw new RequestError(404, "Not found.");
  return id;
}

/** Whether an Accept-Encoding header accepts `coding` ("br", "gzip"); a q of 0 refuses it, "*" accepts any. */
export function acceptsCoding(header: string | null, coding: string): boolean {
  if (!header) return false;
  return header.split(",").some((part) => {
    const [name, ...params] = part.trim().toLowerCase().split(";");
    if (name !== coding && name !== "*") return false;
    const q = params.map((p) => p.trim()).find((p) => p.startsWith("q="));
    return !q || Number(q.slice(2)) > 0;
  });
}
