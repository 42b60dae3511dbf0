import { brotliDecompressSync, gunzipSync } from "node:zlib";
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "@/db";
import { machines } from "@/db/schema";
import * as toolpathRoute from "@/app/api/revisions/[id]/toolpath/route";
import { analyzeProgram } from "@/lib/gcode";
import { analysisOptions } from "@/lib/jobs/analysis";
import { decodeToolpath, TOOLPATH_MEDIA_TYPE } from "@/lib/viewer/toolpath-format";
import { actAs, params } from "./helpers";
import { makeProgram, ncProgram, upload } from "./vault-helpers";

const get = (id: number | string, headers: Record<string, string> = {}) =>
  toolpathRoute.GET(new Request(`http://localhost/api/revisions/${id}/toolpath`, { headers }), params({ id: String(id) }));

describe("GET /api/revisions/{id}/toolpath", () => {
  it("answers the engine's toolpath with its times, brotli or gzip as asked, and 304 for its ETag", async () => {
    await actAs("programmer");
    const { programId, machineId } = await makeProgram({ safeZ: 3 });
    const text = ncProgram(undefined, "G2 X30 Y20 R10\nG4 P1.5\nG1 X0");
    const rev = await upload(programId, text);
    await actAs("operator");

    const res = await get(rev.id, { "accept-encoding": "gzip, deflate, br" });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe(TOOLPATH_MEDIA_TYPE);
    expect(res.headers.get("x-cyclegate-encoding")).toBe("br");
    expect(res.headers.get("cache-control")).toBe("private, no-cache, no-transform");
    const etag = res.headers.get("etag")!;
    expect(etag).toContain(rev.sha256);
    const { path, meta } = decodeToolpath(brotliDecompressSync(Buffer.from(await res.arrayBuffer())));

    // the same engine with the program's options, in this process
    const [machine] = await db().select().from(machines).where(eq(machines.id, machineId));
    const a = analyzeProgram(text, { ...analysisOptions(machine!, { safeZ: 3, partsPerCycle: 1 }), segmentTimes: true });
    expect(path.segmentCount).toBe(a.toolpath.segmentCount);
    expect(Array.from(path.line)).toEqual(Array.from(a.toolpath.line));
    expect(path.time.at(-1)).toBeCloseTo(a.time.totalSeconds, 2);
    expect(meta.safeZ).toBe(3);
    expect(meta.tools.map((t) => t.number)).toEqual([1]);

    const gz = await get(rev.id, { "accept-encoding": "gzip" });
    expect(gz.headers.get("x-cyclegate-encoding")).toBe("gzip");
    expect(decodeToolpath(gunzipSync(Buffer.from(await gz.arrayBuffer()))).path.segmentCount).toBe(path.segmentCount);
    const plain = await get(rev.id, { "accept-encoding": "br;q=0, gzip;q=0" });
    expect(plain.headers.get("x-cyclegate-encoding")).toBeNull();
    expect(decodeToolpath(new Uint8Array(await plain.arrayBuffer())).path.segmentCount).toBe(path.segmentCount);

    const again = await get(rev.id, { "if-none-match": etag });
    expect(again.status).toBe(304);
    expect(await again.text()).toBe("");
  });

  it("refuses the signed-out, and answers 404 for an id that is not a revision", async () => {
    await actAs("anonymous");
    expect((await get(1)).status).toBe(401);
    await actAs("lead");
    expect((await get(2_000_000_000)).status).toBe(404);
    expect((await get("abc")).status).toBe(404);
  });
});
