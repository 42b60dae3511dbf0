/**
 * The 3D backplot in Debian's chromium (WebGL through SwiftShader), checked by reading the canvas's pixels back:
 * the scene marks itself drawn (data-full-drawn), then the test counts pixels of the legend's colours.
 */
import type { Page } from "playwright-core";
import { beforeAll, describe, expect, it } from "vitest";
import { analyzeProgram } from "@/lib/gcode";
import { toMachineProfile, type MachineFields } from "@/lib/machine-profile";
import { formatClock, locate, timelineOf } from "@/lib/viewer/playback";
import { viewerDataFromAnalysis } from "@/lib/viewer/from-analysis";
import { DEMO_MACHINES } from "@/db/demo-data";
import { apiSignIn, appUrl, DEMO_PASSWORD, signIn, useFreshPage } from "./browser";
import { launchChromium } from "./chromium";

const unique = () => Math.random().toString(36).slice(2, 8);

/** The demo shop's manual-change bench mill under a name of the test's own, so entered offsets are the test's alone. */
const MACHINE = { ...DEMO_MACHINES[0]!, notes: "" };

/** Two parts (G54, G55) cut by T1, then drilled by T2; one rapid dives below safe Z (a warning, line 29). */
const TWO_VISES = (tag: string) => {
  const outline = (offset: string) => [`${offset} G0 X0 Y0`, ...(offset === "G54" ? ["G43 H1 Z20"] : []), "G0 Z2", "G1 Z-1 F300", "G1 X40 F900", "G1 Y20", "G1 X0", "G1 Y0", "G0 Z20"];
  const drill = (offset: string) => [`${offset} G0 X20 Y10`, ...(offset === "G54" ? ["G43 H2 Z20", "G0 Z-3"] : ["G0 Z2"]), "G1 Z-8 F100", "G0 Z20"];
  return [
    ...["%", `O4401 (BACKPLOT TEST ${tag})`, "G90 G94 G17 G40 G49 G80 G21", "T1 M6 (D10 END MILL)", "S3000 M3"],
    ...outline("G54"),
    ...outline("G55"),
    ...["G91 G28 Z0", "G90", "T2 M6 (D6 DRILL)", "S2000 M3"],
    ...drill("G54"),
    ...drill("G55"),
    ...["M5", "M30", "%", ""],
  ].join("\n");
};

/** A plate with two pockets and a parking point between them; `dx` moves the right pocket. */
const PLATE = (tag: string, dx: number) => {
  const pocket = (x: number) => [`G0 X${x} Y10`, "G0 Z2", "G1 Z-3 F200", `G1 X${x + 20} F800`, "G1 Y30", `G1 X${x}`, "G1 Y10", "G0 Z20"];
  const head = ["%", `O4402 (PLATE ${tag})`, "G90 G94 G17 G40 G49 G80 G21", "T1 M6 (D8 END MILL)", "S3000 M3", "G54 G0 X0 Y0", "G43 H1 Z20"];
  return [...head, ...pocket(0), "G0 X60 Y40", ...pocket(80 + dx), "M5", "M30", "%", ""].join("\n");
};

const OFFSETS = { G54: { x: -300, y: -120, z: -150 }, G55: { x: -180, y: -120, z: -150 } };

interface Setup {
  machineId: number;
  twoVises: { id: number; text: string };
  plate: { r1: number; r2: number };
}

async function api(cookie: string, method: string, path: string, body?: unknown, text?: string): Promise<any> {
  const res = await fetch(appUrl(path), {
    method,
    headers: { cookie, ...(text !== undefined ? { "content-type": "text/plain" } : body !== undefined ? { "content-type": "application/json" } : {}) },
    body: text ?? (body === undefined ? undefined : JSON.stringify(body)),
  });
  if (res.status >= 300) throw new Error(`${method} ${path} answered ${res.status}: ${await res.text()}`);
  return res.json();
}

async function setUp(): Promise<Setup> {
  const tag = unique();
  const admin = await apiSignIn("admin@cyclegate.test");
  const { machine } = await api(admin, "POST", "/api/machines", { ...MACHINE, name: `Backplot mill ${tag}` });
  const operator = await apiSignIn("operator@cyclegate.test");
  for (const [code, v] of Object.entries(OFFSETS)) await api(operator, "PUT", `/api/machines/${machine.id}/work-offsets`, { code, ...v });
  const programmer = await apiSignIn("programmer@cyclegate.test");
  const { part } = await api(programmer, "POST", "/api/parts", { number: `BP-${tag}`, name: "Backplot test part" });
  const program = async (number: string) =>
    (await api(programmer, "POST", "/api/programs", { programNumber: number, title: "Backplot test", partId: part.id, machineId: machine.id, partsPerCycle: 1 })).program.id as number;
  const upload = async (programId: number, text: string) => (await api(programmer, "POST", `/api/programs/${programId}/revisions`, undefined, text)).revision.id as number;
  const twoText = TWO_VISES(tag);
  const p1 = await program(`O${Math.floor(Math.random() * 80000) + 10000}`);
  const twoVises = { id: await upload(p1, twoText), text: twoText };
  const p2 = await program(`O${Math.floor(Math.random() * 80000) + 10000}`);
  const r1 = await upload(p2, PLATE(tag, 0));
  const r2 = await upload(p2, PLATE(tag, 30));
  return { machineId: machine.id, twoVises, plate: { r1, r2 } };
}

/** Opens a revision page and waits until the backplot has drawn its full path. */
async function openRevision(page: Page, id: number) {
  await page.goto(appUrl(`/revisions/${id}`));
  await page.locator('[data-testid="backplot"][data-full-drawn="1"]').waitFor({ timeout: 45_000 });
}

interface ColorCount {
  count: number;
  minX: number;
  maxX: number;
  minY: number;
  maxY: number;
  cx: number;
}

/** Pixels of the canvas within `tol` of a colour, with their box and mean x (in canvas pixels). */
function countColor(page: Page, hex: string, tol = 10): Promise<ColorCount> {
  return page.evaluate(
    ({ hex, tol }) => {
      const c = document.querySelector('[data-testid="backplot-canvas"] canvas') as HTMLCanvasElement;
      const off = document.createElement("canvas");
      off.width = c.width;
      off.height = c.height;
      const ctx = off.getContext("2d")!;
      ctx.drawImage(c, 0, 0);
      const d = ctx.getImageData(0, 0, c.width, c.height).data;
      const v = parseInt(hex.slice(1), 16);
      const r = (v >> 16) & 255, g = (v >> 8) & 255, b = v & 255;
      let count = 0, minX = Infinity, maxX = -Infinity, minY = Infinity, maxY = -Infinity, sx = 0;
      for (let i = 0; i < d.length; i += 4) {
        if (Math.abs(d[i]! - r) <= tol && Math.abs(d[i + 1]! - g) <= tol && Math.abs(d[i + 2]! - b) <= tol) {
          const p = i / 4, x = p % c.width, y = Math.floor(p / c.width);
          count++;
          sx += x;
          if (x < minX) minX = x;
          if (x > maxX) maxX = x;
          if (y < minY) minY = y;
          if (y > maxY) maxY = y;
        }
      }
      return { count, minX, maxX, minY, maxY, cx: count ? sx / count : NaN };
    },
    { hex, tol },
  );
}

/** Polls the canvas until `ok` holds for the colour's pixels (the scene draws on demand, a frame or two later). */
async function waitColor(page: Page, hex: string, ok: (c: ColorCount) => boolean, what: string): Promise<ColorCount> {
  let last: ColorCount | null = null;
  for (let i = 0; i < 60; i++) {
    last = await countColor(page, hex);
    if (ok(last)) return last;
    await page.waitForTimeout(150);
  }
  throw new Error(`${what}: ${JSON.stringify(last)}`);
}

const legendColor = (page: Page, selector: string) => page.locator(`[data-testid="legend"] ${selector}`).getAttribute("data-color").then((c) => c!);

describe("the 3D backplot", () => {
  const b = useFreshPage();
  let s: Setup;
  beforeAll(async () => {
    s = await setUp();
  });

  it("draws the toolpath, hides a tool's moves, and keeps the page free of policy violations", async () => {
    const { page } = b;
    const violations: string[] = [];
    page.on("console", (m) => {
      if (/Content.Security.Policy|violates/i.test(m.text())) violations.push(m.text());
    });
    await signIn(page, "operator@cyclegate.test");
    await openRevision(page, s.twoVises.id);
    await page.evaluate(() => document.addEventListener("securitypolicyviolation", (e) => console.error(`violates ${e.violatedDirective}`)));
    expect(await page.locator('[data-testid="backplot"]').getAttribute("data-source")).toBe("route");

    // colour by motion: feed moves are drawn
    const feed = await legendColor(page, '[data-legend-kind="1"]');
    const feeds = await waitColor(page, feed, (c) => c.count > 100, "feed pixels");
    expect(feeds.maxX - feeds.minX).toBeGreaterThan(50);

    // colour by tool: T2's drilling is drawn, and gone when T2 is hidden
    await page.getByTestId("color-mode").selectOption("tool");
    const t2 = await legendColor(page, '[data-legend-tool="2"]');
    const t1 = await legendColor(page, '[data-legend-tool="1"]');
    await waitColor(page, t2, (c) => c.count > 10, "T2 pixels");
    await page.getByLabel("Show T2").uncheck();
    await waitColor(page, t2, (c) => c.count === 0, "T2 pixels after hiding T2");
    expect((await countColor(page, t1)).count).toBeGreaterThan(100);
    await page.getByLabel("Show T2").check();
    await waitColor(page, t2, (c) => c.count > 10, "T2 pixels shown again");
    expect(violations).toEqual([]);
  });

  it("machine space puts the G55 part beside the G54 part at the entered distance", async () => {
    const { page } = b;
    await signIn(page, "operator@cyclegate.test");
    await openRevision(page, s.twoVises.id);
    await page.getByTestId("color-mode").selectOption("offset");
    const g54 = await legendColor(page, '[data-legend-offset="G54"]');
    const g55 = await legendColor(page, '[data-legend-offset="G55"]');
    const stage = page.getByTestId("backplot-stage");
    await stage.focus();
    await page.keyboard.press("t");
    // part space: both parts on their own zero, one on the other (the later G55 drawn over G54)
    const over = await waitColor(page, g55, (c) => c.count > 50, "G55 pixels in part space");
    expect((await countColor(page, g54)).count).toBeLessThan(over.count / 4);
    await page.getByTestId("machine-space").click();
    await stage.focus();
    await page.keyboard.press("t");
    await page.waitForTimeout(400);
    const a = await waitColor(page, g54, (c) => c.count > 50, "G54 pixels in machine space");
    const bb = await waitColor(page, g55, (c) => c.count > 50 && c.minX > a.maxX, "G55 pixels beside G54");
    // each part is 40 mm wide (X0 to X40): that gives the scale; the entered origins are 120 mm apart in X
    const pxPerMm = (a.maxX - a.minX + bb.maxX - bb.minX) / 2 / 40;
    expect(Math.abs((bb.minX - a.minX) / pxPerMm - (OFFSETS.G55.x - OFFSETS.G54.x))).toBeLessThan(2);
    // the same height on the screen: the origins share Y
    expect(Math.abs(bb.minY - a.minY)).toBeLessThanOrEqual(2);
    await expect(page.getByTestId("zero-label").filter({ hasText: "G55" }).isVisible()).resolves.toBe(true);
  });

  it("a finding marker selects its line and shows the finding; a selected line lights up its moves", async () => {
    const { page } = b;
    await signIn(page, "operator@cyclegate.test");
    await openRevision(page, s.twoVises.id);
    await page.getByLabel("Hide the legend").click();
    const marker = page.locator('[data-testid="finding-marker"][data-line="29"]');
    await marker.waitFor({ state: "visible" });
    await marker.click();
    await expect(page.getByTestId("code-selected").innerText()).resolves.toContain("line 29");
    await expect(page.getByTestId("finding-card").innerText()).resolves.toMatch(/line 29[\s\S]*below safe Z/);

    // nothing white before; selecting line 10 (G1 X40 under G54) in the code draws its move in white
    await page.keyboard.press("Escape");
    await page.locator('[data-testid="code-scroll"] [data-line="3"]').click();
    await waitColor(page, "#ffffff", (c) => c.count === 0, "white pixels with a line without moves selected");
    await page.locator('[data-testid="code-scroll"] [data-line="10"]').click();
    const white = await waitColor(page, "#ffffff", (c) => c.count > 20, "the selected line's move");
    expect(white.maxX - white.minX).toBeGreaterThan(20);

    // and the other way: a click on a move selects its line in the code
    await page.getByTestId("color-mode").selectOption("tool");
    await page.getByRole("button", { name: "Legend" }).click();
    const t2 = await legendColor(page, '[data-legend-tool="2"]');
    await page.getByLabel("Hide the legend").click();
    const drill = await waitColor(page, t2, (c) => c.count > 10, "T2 pixels");
    const canvas = page.locator('[data-testid="backplot-canvas"] canvas');
    const box = (await canvas.boundingBox())!;
    const scale = (await canvas.evaluate((c: HTMLCanvasElement) => c.width / c.getBoundingClientRect().width)) as number;
    const x = drill.minX, y = (drill.minY + drill.maxY) / 2;
    // the drill's left vertical line: the pixel nearest its middle
    await page.mouse.click(box.x + x / scale, box.y + y / scale);
    await page.getByTestId("picked").waitFor();
    await expect(page.getByTestId("picked").innerText()).resolves.toContain("T2");
    const picked = Number(/line (\d+)/.exec(await page.getByTestId("code-selected").innerText())?.[1]);
    expect([29, 30, 31, 33, 34, 35]).toContain(picked);
  });

  it("the scrubber moves the tool and the current line, on the engine's time estimate", async () => {
    const { page } = b;
    await signIn(page, "operator@cyclegate.test");
    await openRevision(page, s.twoVises.id);
    const options = { machine: toMachineProfile(MACHINE as unknown as MachineFields), parts: 1, maxFindingsPerRule: 200 };
    const { path, meta } = viewerDataFromAnalysis(analyzeProgram(s.twoVises.text, { ...options, segmentTimes: true }));
    const tl = timelineOf(path);

    const scrub = page.getByTestId("scrubber");
    const at = async (t: number) => {
      await scrub.fill(String(t));
      await page.getByTestId("play-line").waitFor();
      const s0 = locate(tl, t);
      const seg = Math.min(s0.segment, path.segmentCount - 1);
      await expect.poll(() => page.getByTestId("play-line").innerText()).toBe(String(path.line[seg]));
      expect(await page.getByTestId("play-elapsed").innerText()).toBe(formatClock(t));
      expect(await page.getByTestId("play-remaining").innerText()).toBe(formatClock(meta.totalSeconds - t));
      expect(await page.getByTestId("code-selected").innerText()).toContain(`line ${path.line[seg]}`);
      return seg;
    };
    // halfway through the first cut along X under G54 (line 10)
    const cut = Array.from(path.line).indexOf(10);
    const t1 = (path.startTime[cut]! + path.time[cut]!) / 2;
    expect(await at(t1)).toBe(cut);
    const m1 = await waitColor(page, "#ff3ec9", (c) => c.count > 20, "the tool marker");
    // later, on the second part's cut along X (line 18)
    const cut2 = Array.from(path.line).indexOf(18);
    const t2 = path.time[cut2]! - 0.2;
    expect(await at(t2)).toBe(cut2);
    const m2 = await waitColor(page, "#ff3ec9", (c) => c.count > 20 && Math.abs(c.cx - m1.cx) > 5, "the tool marker moved");
    expect(m2.cx).not.toBeCloseTo(m1.cx, 0);

    // inside the 30 s manual change to T2: a pause that names the tool to insert
    const firstT2 = Array.from(path.tool).indexOf(1);
    await scrub.fill(String(path.startTime[firstT2]! - 10));
    await expect.poll(() => page.getByTestId("play-pause").innerText()).toContain("insert T2");
    expect(await page.getByTestId("play-pause").innerText()).toContain("D6 DRILL");

    // the step button ends the move: the time shown is the engine's end of that move
    await scrub.fill(String(t1));
    await page.getByRole("button", { name: "›" }).click();
    await expect.poll(() => page.getByTestId("play-elapsed").innerText()).toBe(formatClock(path.time[cut]!));
  });

  it("the overlay marks the segments of the pocket the new revision moved", async () => {
    const { page } = b;
    await signIn(page, "lead@cyclegate.test");
    await openRevision(page, s.plate.r2);
    await page.getByTestId("backplot-stage").focus();
    await page.keyboard.press("t");
    const feed = await legendColor(page, '[data-legend-kind="1"]');
    const all = await waitColor(page, feed, (c) => c.count > 100, "feed pixels");
    await page.getByTestId("overlay-select").selectOption({ label: "revision 1 (draft)" });
    const changed = await waitColor(page, "#ff5c7a", (c) => c.count > 30, "changed segments");
    // the path spans X0-X130; what changed is the right pocket and the rapid to it from the parking point at X60:
    // nothing left of X39 (the left pocket is X0-X20), most of it right of the middle
    const mid = (all.minX + all.maxX) / 2;
    expect(changed.minX).toBeGreaterThan(all.minX + (all.maxX - all.minX) * 0.3);
    expect(changed.cx).toBeGreaterThan(mid);
    await expect(page.getByTestId("legend").innerText()).resolves.toMatch(/changed in this revision \(\d+\)/);
  });

  it("keyboard help opens and closes", async () => {
    const { page } = b;
    await signIn(page, "programmer@cyclegate.test");
    await openRevision(page, s.plate.r1);
    await page.getByTestId("backplot-stage").focus();
    await page.keyboard.press("?");
    await expect(page.getByTestId("backplot-help").innerText()).resolves.toContain("fit the path");
    await page.keyboard.press("Escape");
    await page.getByTestId("backplot-help").waitFor({ state: "detached" });
  });

  it("without WebGL says so, and the rest of the revision page still works", async () => {
    const browser = await launchChromium(["--disable-3d-apis", "--disable-webgl"]);
    try {
      const page = await (await browser.newContext({ viewport: { width: 1280, height: 800 } })).newPage();
      await signIn(page, "operator@cyclegate.test", DEMO_PASSWORD);
      await page.goto(appUrl(`/revisions/${s.twoVises.id}`));
      await page.getByTestId("backplot-no-webgl").waitFor();
      await page.locator('[data-testid="code-scroll"] [data-line="2"]').click();
      await expect(page.getByTestId("code-selected").innerText()).resolves.toContain("line 2");
    } finally {
      await browser.close();
    }
  });
});
