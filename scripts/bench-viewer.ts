/**
 * npm run bench:viewer: the 3D backplot on the revision of the 1,000,000-line program of `npm run bench`, in headless
 * Debian chromium (WebGL through SwiftShader, the CPU renderer), against the built app on a throwaway database
 * (`cyclegate_bench_viewer`, dropped before and after). Prints figures with PASS/FAIL; a benchmark, not a test.
 *
 * 1. Both ways to the browser, each from a fresh browser context, alternating: the toolpath route (CGTP, brotli; its
 *    first request builds the answer, later ones come from the server's cache, a revisit revalidates with the ETag)
 *    against the program's bytes (the code pane's gzipped download, which the page makes anyway) run through the
 *    engine in the viewer's worker. Bytes on the wire per segment and the time from the viewer's start (the page has
 *    loaded) until the path's buffers are in the page, on loopback and on an emulated shop Wi-Fi link with a slower
 *    CPU; medians of BENCH_ROUNDS (3).
 * 2. Drawing: from the buffers in the page to the first drawn frame (coarse), and to the full path.
 * 3. Orbiting: frame times while the view is dragged round (coarse index), and the page thread's share per frame,
 *    beside the same on a 10,000-line program (it must not grow with the path).
 * 4. Memory: the page's JS heap (with array buffers) with the backplot, less the same page without WebGL (no
 *    backplot), per segment; and what the viewer's own typed arrays add up to.
 */
import { gzipSync } from "node:zlib";
import type { Browser, Page } from "playwright-core";
import { launchChromium } from "../tests/e2e/chromium";
import { benchProgram } from "./bench-program";
import { line, median, ms, startBenchApp, verdict } from "./bench-app";

const DB = "cyclegate_bench_viewer";
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 3);
const TABLET_ROUNDS = Math.min(ROUNDS, 2);
const PASSWORD = "bench-password-1";
/** A shop tablet on Wi-Fi: 40 Mbit/s down, 10 up, 20 ms; a CPU about twice as slow as this machine's core. */
const TABLET = { downloadThroughput: (40e6 / 8) | 0, uploadThroughput: (10e6 / 8) | 0, latency: 20, cpu: 2 };

interface Load {
  /** navigation -> the viewer starts its worker (the page itself: server render, scripts, hydration), ms */
  startMs: number;
  wireBytes: number;
  buffersMs: number;
  /** navigation -> buffers in the page, ms */
  dataMs: number;
  source: string;
  firstFrameMs: number;
  fullFrameMs: number;
  fetchMs: number;
  waitMs: number;
  buildMs: number;
}

/** Chromium as the browser tests launch it, with precise memory figures. */
const launch = (extra: string[] = []) => launchChromium(["--enable-precise-memory-info", ...extra]);

async function signedInPage(browser: Browser, base: string, email: string, opts: { source?: "route" | "bytes"; tablet?: boolean } = {}): Promise<Page> {
  const ctx = await browser.newContext({ viewport: { width: 1440, height: 900 } });
  const page = await ctx.newPage();
  await page.goto(`${base}/sign-in`);
  await page.getByLabel("Email", { exact: true }).fill(email);
  await page.getByLabel("Password", { exact: true }).fill(PASSWORD);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => u.pathname === "/", { timeout: 60_000 });
  await page.evaluate((s) => {
    localStorage.setItem("cyclegate.backplot.bench", "1");
    if (s) localStorage.setItem("cyclegate.backplot.source", s);
  }, opts.source ?? "route");
  if (opts.tablet) {
    const cdp = await ctx.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, ...TABLET });
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: TABLET.cpu });
  }
  return page;
}

/** Opens the revision page and waits for the full path; times from the navigation's start. */
async function load(page: Page, base: string, revisionId: number): Promise<Load> {
  await page.goto(`${base}/revisions/${revisionId}`, { timeout: 120_000 });
  await page.locator('[data-testid="backplot"][data-full-drawn="1"]').waitFor({ timeout: 300_000 });
  // (no functions declared inside: the script runner would wrap them in a helper the page does not have)
  return page.evaluate(() => {
    const data = performance.getEntriesByName("backplot:data", "mark")[0] as PerformanceMark;
    const report = data.detail as { wireBytes: number; source: string; fetchMs: number; waitMs: number; buildMs: number; buffersMs: number };
    const full = performance.getEntriesByName("backplot:full-frame", "mark")[0] as PerformanceMark;
    const first = (performance.getEntriesByName("backplot:coarse-frame", "mark")[0] as PerformanceMark | undefined) ?? full;
    const start = performance.getEntriesByName("backplot:start", "mark")[0] as PerformanceMark;
    return {
      startMs: start.startTime,
      wireBytes: report.wireBytes,
      source: report.source,
      fetchMs: report.fetchMs,
      waitMs: report.waitMs,
      buildMs: report.buildMs,
      buffersMs: report.buffersMs,
      dataMs: data.startTime,
      firstFrameMs: first.startTime,
      fullFrameMs: full.startTime,
    };
  });
}

/** Drags the view round for a while and returns the frames the scene timed. */
async function orbit(page: Page) {
  const canvas = page.locator('[data-testid="backplot-canvas"] canvas');
  await canvas.scrollIntoViewIfNeeded();
  const box = (await canvas.boundingBox())!;
  await page.evaluate(() => {
    const c = (window as unknown as { __cyclegateBackplot: { timing: boolean; frames: unknown[] } }).__cyclegateBackplot;
    c.frames = [];
    c.timing = true;
  });
  const cx = box.x + box.width / 2, cy = box.y + box.height / 2;
  await page.mouse.move(cx, cy);
  await page.mouse.down();
  for (let i = 1; i <= 30; i++) {
    await page.mouse.move(cx + Math.sin(i / 5) * 120, cy + Math.cos(i / 7) * 40);
    await page.waitForTimeout(60);
  }
  await page.mouse.up();
  await page.waitForTimeout(1500);
  return page.evaluate(() => {
    const c = (window as unknown as { __cyclegateBackplot: { timing: boolean; frames: { ms: number; cpuMs: number; coarse: boolean; segments: number }[] } }).__cyclegateBackplot;
    c.timing = false;
    return c.frames;
  });
}

/** The page's JS heap plus array-buffer backing stores, after a full collection (CDP). */
async function heapBytes(page: Page): Promise<number> {
  const cdp = await page.context().newCDPSession(page);
  await cdp.send("HeapProfiler.enable");
  for (let i = 0; i < 3; i++) await cdp.send("HeapProfiler.collectGarbage");
  const usage = (await cdp.send("Runtime.getHeapUsage")) as { usedSize: number; embedderHeapUsedSize?: number; backingStorageSize?: number };
  return usage.usedSize + (usage.backingStorageSize ?? 0);
}

async function main() {
  console.log("Cyclegate backplot benchmark (headless chromium, SwiftShader; throwaway database cyclegate_bench_viewer)\n");
  const bench = await startBenchApp(DB);
  const { db, base } = bench;
  const browsers: Browser[] = [];
  try {
    const machine = await db.query<{ id: number }>(
      `insert into machines (name, units, travel_x_min, travel_x_max, travel_y_min, travel_y_max, travel_z_min, travel_z_max,
         rapid_rate, max_feed, max_spindle, acceleration, tool_change_seconds, manual_tool_change, spindle_program_controlled, safe_z, work_offset_count)
       values ('Bench machine', 'mm', -800, 0, -500, 0, -500, 0, 24000, 10000, 12000, 2500, 4, false, true, 2, 54) returning id`,
    );
    const cookie = await bench.user("bench-programmer@cyclegate.test", "programmer", PASSWORD);
    const call = async (p: string, init: RequestInit = {}) => {
      const res = await fetch(`${base}${p}`, { ...init, headers: { cookie, ...(init.headers as Record<string, string>) } });
      if (!res.ok) throw new Error(`${p} answered ${res.status}`);
      return res.json();
    };
    const json = { "content-type": "application/json" };
    const part = await call("/api/parts", { method: "POST", headers: json, body: JSON.stringify({ number: "BENCH-1", name: "Bench part" }) });
    const program = await call("/api/programs", {
      method: "POST",
      headers: json,
      body: JSON.stringify({ programNumber: "O1234", title: "Bench program", partId: part.part.id, machineId: machine.rows[0]!.id }),
    });
    const upload = async (text: string) => {
      const up = await call(`/api/programs/${program.program.id}/revisions`, { method: "POST", headers: { "content-type": "text/plain" }, body: text });
      const id: number = up.revision.id;
      for (let i = 0; i < 12000; i++) {
        const r = await db.query<{ state: string }>("select state from revision_analyses where revision_id = $1", [id]);
        if (r.rows[0]?.state === "done") return id;
        await new Promise((r2) => setTimeout(r2, 10));
      }
      throw new Error("the analysis did not finish");
    };
    const text = benchProgram();
    const big = await upload(text);
    const gzipFile = gzipSync(Buffer.from(text), { level: 6 }).length;
    const small = await upload(benchProgram(10_000));

    // ---- 1. both ways to the browser ----
    const browser = await launch();
    browsers.push(browser);
    const fresh = async (source: "route" | "bytes", tablet = false) => {
      const page = await signedInPage(browser, base, "bench-programmer@cyclegate.test", { source, tablet });
      const r = await load(page, base, big);
      return { page, r };
    };
    console.log("1. The path to the browser: 1,000,000 lines, both ways (fresh browser contexts, the two ways alternating)");
    const cold = await fresh("route");
    const nSeg = await cold.page.evaluate(() => Number(document.querySelector('[data-testid="backplot"]')?.getAttribute("data-segments") ?? 0));
    const revisit = await load(cold.page, base, big);
    await cold.page.context().close();
    const runs: Record<string, Load[]> = { route: [], bytes: [], "route-tablet": [], "bytes-tablet": [] };
    for (let round = 0; round < ROUNDS; round++) {
      for (const [key, source, tablet] of [["route", "route", false], ["bytes", "bytes", false], ["route-tablet", "route", true], ["bytes-tablet", "bytes", true]] as const) {
        if (tablet && round >= TABLET_ROUNDS) continue;
        const { page, r } = await fresh(source, tablet);
        runs[key]!.push(r);
        await page.context().close();
      }
    }
    line("segments in the path", nSeg.toLocaleString("en"));
    const per = (b: number) => `${(b / nSeg).toFixed(2)} B/segment (${(b / 1e6).toFixed(2)} MB)`;
    /** The viewer's own part: from its start (the page loaded) to the buffers in the page. */
    const own = (r: Load) => r.dataMs - r.startMs;
    const med = (rs: Load[], f: (r: Load) => number) => median(rs.map(f));
    const row = (label: string, rs: Load[]) =>
      line(
        label,
        `${ms(med(rs, own))} (fetch ${ms(med(rs, (r) => r.fetchMs))} of which server ${ms(med(rs, (r) => r.waitMs))}, ${rs[0]!.source === "route" ? "decode" : "engine"} ${ms(med(rs, (r) => r.buildMs))}, buffers ${ms(med(rs, (r) => r.buffersMs))}); ${rs[0]!.source === "route" ? per(rs[0]!.wireBytes) : "0 B more: the code pane's download, " + per(gzipFile)}`,
      );
    console.log(`  viewer start -> buffers in the page, median of ${ROUNDS} (tablet ${TABLET_ROUNDS}):`);
    line("route, first request (the server builds the answer)", `${ms(own(cold.r))} (fetch ${ms(cold.r.fetchMs)}, decode ${ms(cold.r.buildMs)})`);
    row("route, answer cached on the server", runs.route!);
    line("route, revisit (ETag revalidated, 304)", `${ms(own(revisit))}, ${revisit.wireBytes} B on the wire`);
    row("bytes (code pane's download) + engine in the worker", runs.bytes!);
    row("tablet link + 2x slower CPU: route, cached", runs["route-tablet"]!);
    row("tablet link + 2x slower CPU: bytes + engine", runs["bytes-tablet"]!);
    const lan = [med(runs.route!, own), med(runs.bytes!, own)] as const;
    const tab = [med(runs["route-tablet"]!, own), med(runs["bytes-tablet"]!, own)] as const;
    const faster = (x: readonly [number, number]) => (x[0] <= x[1] ? `route, by ${ms(x[1] - x[0])}` : `bytes, by ${ms(x[0] - x[1])}`);
    line("faster on loopback", faster(lan));
    line("faster on the tablet link (the operator at the machine)", faster(tab));
    // the operator looks on a tablet: that link decides; the route also sends ~5x fewer bytes and spares the device
    // an engine run
    line("kept: the toolpath route (faster on the tablet link)", tab[0] <= tab[1] ? "yes" : "NO: the bytes were faster on the tablet link here");
    line("bytes on the wire per segment, route (target <= 16)", `${(runs.route![0]!.wireBytes / nSeg).toFixed(2)}  ${verdict(runs.route![0]!.wireBytes / nSeg <= 16)}`);
    line("bytes on the wire per segment, program text (gzip)", `${(gzipFile / nSeg).toFixed(2)}  ${verdict(gzipFile / nSeg <= 16)}`);

    // ---- 2. drawing ----
    console.log("\n2. Drawing (route, server cache warm; SwiftShader)");
    const draw = runs.route!.sort((a, b) => a.firstFrameMs - a.dataMs - (b.firstFrameMs - b.dataMs))[Math.floor((ROUNDS - 1) / 2)]!;
    line("navigation -> buffers in the page", `${ms(draw.dataMs)} (of which the page itself, before the viewer starts: ${ms(draw.startMs)})`);
    line("buffers -> first drawn frame (coarse while it settles)", `${ms(draw.firstFrameMs - draw.dataMs)}  ${verdict(draw.firstFrameMs - draw.dataMs <= 1500)} (target <= 1.5 s)`);
    line("buffers -> full path drawn", ms(draw.fullFrameMs - draw.dataMs));
    line("navigation -> first drawn frame", ms(draw.firstFrameMs));

    // ---- 3. orbiting ----
    console.log("\n3. Orbiting (mouse drag, 30 moves; frames timed to the GPU's finish)");
    const orbitOf = async (id: number) => {
      const page = await signedInPage(browser, base, "bench-programmer@cyclegate.test");
      await load(page, base, id);
      const frames = await orbit(page);
      await page.context().close();
      return frames;
    };
    const framesBig = await orbitOf(big);
    const framesSmall = await orbitOf(small);
    const coarse = framesBig.filter((f) => f.coarse);
    const still = framesBig.filter((f) => !f.coarse);
    line("frames while moving (coarse index)", `${coarse.length}, ${coarse[0]?.segments.toLocaleString("en") ?? 0} segments each`);
    const orbitMs = median(coarse.map((f) => f.ms));
    line("frame time while orbiting, median (target <= 100 ms)", `${ms(orbitMs)}  ${verdict(coarse.length > 0 && orbitMs <= 100)}`);
    line("worst frame while orbiting", ms(Math.max(...coarse.map((f) => f.ms))));
    if (still.length) line("full path once still", `${ms(median(still.map((f) => f.ms)))} (${still[0]!.segments.toLocaleString("en")} segments)`);
    const cpuBig = median(framesBig.map((f) => f.cpuMs));
    const cpuSmall = median(framesSmall.map((f) => f.cpuMs));
    line("page thread per frame, 1,000,000 lines (median)", `${cpuBig.toFixed(1)} ms`);
    line("page thread per frame, 10,000 lines (median)", `${cpuSmall.toFixed(1)} ms`);
    line("page thread work does not grow with the path", verdict(cpuBig <= Math.max(4, cpuSmall * 3)));

    // ---- 4. memory ----
    console.log("\n4. Memory of the page (JS heap and array buffers, after garbage collection)");
    const withPage = await signedInPage(browser, base, "bench-programmer@cyclegate.test");
    await load(withPage, base, big);
    await withPage.waitForTimeout(1000);
    const heapWith = await heapBytes(withPage);
    const accounted = await withPage.evaluate(() => Number(document.querySelector('[data-testid="backplot"]')?.getAttribute("data-buffer-bytes") ?? 0));
    await withPage.context().close();
    const noGl = await launch(["--disable-3d-apis", "--disable-webgl"]);
    browsers.push(noGl);
    const withoutPage = await signedInPage(noGl, base, "bench-programmer@cyclegate.test");
    await withoutPage.goto(`${base}/revisions/${big}`);
    await withoutPage.getByTestId("backplot-no-webgl").waitFor();
    await withoutPage.locator('[data-testid="code-scroll"]').waitFor({ timeout: 120_000 });
    await withoutPage.waitForTimeout(1000);
    const heapWithout = await heapBytes(withoutPage);
    const delta = heapWith - heapWithout;
    line("revision page with the backplot", `${(heapWith / 1e6).toFixed(1)} MB`);
    line("the same page without WebGL (no backplot)", `${(heapWithout / 1e6).toFixed(1)} MB`);
    line("the backplot's share per segment (target <= 40)", `${(delta / nSeg).toFixed(1)} B  ${verdict(delta / nSeg <= 40)}`);
    line("its typed arrays, as counted by the viewer", `${(accounted / nSeg).toFixed(1)} B/segment`);
  } finally {
    for (const b of browsers) await b.close().catch(() => undefined);
    await bench.close();
  }
}

await main();
