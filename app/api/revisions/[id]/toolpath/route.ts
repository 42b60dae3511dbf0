import { gunzipSync } from "node:zlib";
import { RequestError } from "@/lib/auth/errors";
import { authorize } from "@/lib/auth/session";
import { getToolpathSource } from "@/lib/dal/toolpath";
import { acceptsCoding, parseId, route } from "@/lib/http";
import { PRECOMPRESSED_HEADER } from "@/lib/security-headers";
import { TOOLPATH_MEDIA_TYPE } from "@/lib/viewer/toolpath-format";
import { cachedToolpath, toolpathAnswer, toolpathEtag } from "@/lib/viewer/toolpath-service";

export const dynamic = "force-dynamic";

type Ctx = { params: Promise<{ id: string }> };

/**
 * The revision's toolpath for the 3D backplot in the CGTP layout (lib/viewer/toolpath-format.ts), brotli or gzip as
 * the client accepts (compressed when built, so a cached answer costs no compression). The same file, engine and options always give the same answer: it is built once, cached, and
 * revalidated with its ETag (304 without a body).
 */
export const GET = route<Ctx>(async (req, { params }) => {
  await authorize("readPrograms");
  const source = await getToolpathSource(parseId((await params).id));
  if (!source) throw new RequestError(404, "No such revision.");
  const etag = toolpathEtag(source.sha256, source.options);
  const headers: Record<string, string> = {
    ETag: etag,
    // private: it needs a session; no-cache: the browser keeps it and asks with If-None-Match each time;
    // no-transform: it is compressed already
    "Cache-Control": "private, no-cache, no-transform",
    Vary: "Accept-Encoding",
    "X-Content-Type-Options": "nosniff",
  };
  const match = req.headers.get("if-none-match");
  if (match && match.split(",").some((t) => t.trim().replace(/^W\//, "") === etag)) return new Response(null, { status: 304, headers });
  const t0 = performance.now();
  const hit = cachedToolpath(etag);
  const answer = hit ?? (await toolpathAnswer(etag, source.readBytes, source.options));
  const timing = hit
    ? "cache;desc=hit"
    : `engine;dur=${answer.timing.engine.toFixed(0)}, encode;dur=${answer.timing.encode.toFixed(0)}, compress;dur=${answer.timing.compress.toFixed(0)}, total;dur=${(performance.now() - t0).toFixed(0)}`;
  const enc = req.headers.get("accept-encoding");
  const [body, coding] = acceptsCoding(enc, "br") ? [answer.br, "br"] : acceptsCoding(enc, "gzip") ? [answer.gzip, "gzip"] : [new Uint8Array(gunzipSync(answer.gzip)), null];
  return new Response(body as Uint8Array<ArrayBuffer>, {
    headers: {
      ...headers,
      "Content-Type": TOOLPATH_MEDIA_TYPE,
      "Content-Length": String(body.byteLength),
      // Next drops Content-Encoding from route handlers; scripts/serve.ts restores it from this header
      ...(coding && { [PRECOMPRESSED_HEADER]: coding }),
      "X-Toolpath-Segments": String(answer.segments),
      "X-Toolpath-Size": String(answer.size),
      "Server-Timing": timing,
    },
  });
});
