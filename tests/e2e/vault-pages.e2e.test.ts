import { createHash } from "node:crypto";
import { readFile } from "node:fs/promises";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { appUrl, DEMO_PASSWORD, newContext, signIn, useFreshPage } from "./browser";
import { zigzagProgram } from "./nc-files";

const unique = () => Math.random().toString(36).slice(2, 8);
const sha256 = (b: Uint8Array | string) => createHash("sha256").update(b).digest("hex");

/** Drops a text file on `selector` the way a desktop drag does: dragenter, dragover, drop with a DataTransfer. */
async function dropFile(page: Page, selector: string, name: string, text: string) {
  const dt = await page.evaluateHandle(
    ({ name, text }) => {
      const d = new DataTransfer();
      d.items.add(new File([text], name, { type: "text/plain" }));
      return d;
    },
    { name, text },
  );
  for (const type of ["dragenter", "dragover", "drop"]) await page.dispatchEvent(selector, type, { dataTransfer: dt });
}

/** Creates a part and a program through the new-program page; returns the program page's path. */
async function createProgramThroughPage(page: Page, programNumber: string, machine: string): Promise<string> {
  await page.goto(appUrl("/programs/new"));
  const part = `BT-${unique()}`;
  await page.getByLabel("Part number").fill(part);
  await page.getByLabel("Name", { exact: true }).fill("Browser test bracket");
  await page.getByRole("button", { name: "Add part" }).click();
  await page.getByText(`Part ${part} added`).waitFor();
  await expect(page.getByLabel("Part", { exact: true }).locator("option:checked").innerText()).resolves.toContain(part);
  await page.getByLabel("Program number").fill(programNumber);
  await page.getByLabel("Title").fill("Browser test program");
  await page.getByLabel("Machine").selectOption({ label: machine });
  await page.getByRole("button", { name: "Create program" }).click();
  await page.waitForURL((u) => /^\/programs\/\d+$/.test(u.pathname), { timeout: 30_000 });
  return new URL(page.url()).pathname;
}

/** Uploads through the JSON API with the page's session; returns the revision id. */
async function apiUpload(page: Page, programId: string, name: string, text: string): Promise<number> {
  const res = await page.request.post(appUrl(`/api/programs/${programId}/revisions`), {
    headers: { "content-type": "text/plain", "x-file-name": name },
    data: Buffer.from(text),
  });
  expect(res.status()).toBe(201);
  return ((await res.json()) as { revision: { id: number } }).revision.id;
}

/** Waits until the server's check of a revision is done (polling the JSON API). */
async function waitChecked(page: Page, revisionId: number) {
  for (let i = 0; i < 120; i++) {
    const r = (await (await page.request.get(appUrl(`/api/revisions/${revisionId}`))).json()) as { revision: { analysis: { state: string } | null } };
    if (r.revision.analysis?.state === "done") return;
    await page.waitForTimeout(500);
  }
  throw new Error(`revision ${revisionId} was not checked in time`);
}

describe("vault pages in the browser", () => {
  const b = useFreshPage();

  it("a programmer drops a file, sees the browser's check and the bytes going up, submits; a lead releases with the password; the download is the same bytes", async () => {
    const { page } = b;
    await signIn(page, "programmer@cyclegate.test");
    const programNumber = `O${Math.floor(Math.random() * 90000) + 10000}`;
    const programPath = await createProgramThroughPage(page, programNumber, "Vertical centre 2");

    // A bigger file on a slowed link, so the bar is seen between empty and full.
    const text = zigzagProgram(unique(), 40_000);
    const cdp = await page.context().newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: 300 * 1024 });
    await dropFile(page, '[data-testid="drop-zone"]', "bracket-op10.nc", text);

    const summary = page.getByTestId("browser-summary");
    await summary.waitFor({ timeout: 30_000 });
    await expect(page.getByTestId("browser-offsets").innerText()).resolves.toBe("G54");
    await expect(page.getByTestId("browser-tools").innerText()).resolves.toBe("T1");
    await expect(page.getByTestId("browser-errors").innerText()).resolves.toMatch(/^0 errors/);
    const bar = page.getByTestId("upload-progressbar");
    await bar.waitFor();
    const seen = Number(await bar.getAttribute("aria-valuenow"));
    expect(seen).toBeLessThan(100);
    await page.waitForFunction(() => {
      const el = document.querySelector('[data-testid="upload-progressbar"]');
      const v = Number(el?.getAttribute("aria-valuenow"));
      return v > 0 && v < 100;
    });
    await cdp.send("Network.emulateNetworkConditions", { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });

    const browserSha = await page.getByTestId("browser-sha256").innerText();
    expect(browserSha).toBe(sha256(text));
    await page.getByTestId("sha-match").waitFor({ timeout: 60_000 });
    await page.locator('[data-testid="upload-stored"] [data-analysis="done"]').waitFor({ timeout: 60_000 });
    await page.getByTestId("open-revision").click();
    await page.waitForURL((u) => /^\/revisions\/\d+$/.test(u.pathname));
    const revisionPath = new URL(page.url()).pathname;
    await expect(page.getByTestId("revision-sha256").innerText()).resolves.toBe(browserSha);

    await page.getByLabel("Comment for the lead (optional)").fill("First cut of the bracket.");
    await page.getByRole("button", { name: /Submit revision 1 for review/ }).click();
    await page.getByTestId("done-note").getByText(/Submitted for review/).waitFor();
    await page.locator('[data-status="submitted"]').first().waitFor();

    const leadContext = await newContext(b.browser);
    const lead = await leadContext.newPage();
    await signIn(lead, "lead@cyclegate.test");
    await lead.goto(appUrl(revisionPath));
    await lead.getByLabel("Release comment").fill("Checked the zigzag against the drawing.");
    await lead.getByRole("button", { name: /Sign and release/ }).click();
    await lead.locator("#password-error").getByText(/password/i).waitFor();
    await lead.getByLabel("Your password, to sign").fill(DEMO_PASSWORD);
    await lead.getByRole("button", { name: /Sign and release/ }).click();
    await lead.getByTestId("done-note").getByText(/Released/).waitFor();
    await lead.locator('[data-status="released"]').first().waitFor();
    await lead.locator('[data-meaning="released"]').getByText(browserSha).waitFor();

    const [download] = await Promise.all([lead.waitForEvent("download"), lead.getByTestId("download").click()]);
    const bytes = await readFile((await download.path())!);
    expect(sha256(bytes)).toBe(browserSha);
    expect(download.suggestedFilename()).toBe("bracket-op10.nc");

    await lead.goto(appUrl(programPath));
    await lead.getByRole("link", { name: "Released: revision 1" }).waitFor();
    await lead.locator('[data-action="revision.release"]').first().waitFor();
    await leadContext.close();
  });

  it("keeps the programs filters and sorting in the address", async () => {
    const { page } = b;
    await signIn(page, "operator@cyclegate.test");
    await page.goto(appUrl("/programs"));
    const all = await page.locator("[data-program]").count();
    expect(all).toBeGreaterThan(1);
    const first = await page.locator("[data-program]").first().getAttribute("data-program");

    await page.getByLabel("Search").fill(first!);
    await page.getByRole("button", { name: "Apply filters" }).click();
    await page.waitForURL((u) => u.searchParams.get("q") === first);
    await expect(page.locator("[data-program]").count()).resolves.toBeGreaterThanOrEqual(1);
    for (const p of await page.locator("[data-program]").all()) expect(await p.getAttribute("data-program")).toContain(first!);

    // A shared link opens the same view.
    await page.goto(appUrl("/programs?status=released&machine=999999"));
    await page.getByText("No program matches these filters.").waitFor();
    await page.goto(appUrl("/programs?status=released"));
    const released = await page.locator("[data-program]").count();
    expect(released).toBeGreaterThan(0);
    expect(released).toBeLessThanOrEqual(all);
    await expect(page.getByLabel("Status").inputValue()).resolves.toBe("released");

    await page.getByRole("button", { name: /^Program/ }).click();
    await page.waitForURL((u) => u.searchParams.get("sort") === "programNumber" && u.searchParams.get("status") === "released");
    const numbers = await page.locator("[data-program]").evaluateAll((rows) => rows.map((r) => r.getAttribute("data-program")!.toLowerCase()));
    expect(numbers).toEqual([...numbers].sort());
  });

  it("scrolls the code pane to a finding's line and marks it; the compare page shows the changed line", async () => {
    const { page } = b;
    await signIn(page, "programmer@cyclegate.test");
    const programPath = await createProgramThroughPage(page, `O${Math.floor(Math.random() * 90000) + 10000}`, "Bench mill 1");
    const programId = programPath.split("/").pop()!;
    const tag = unique();
    const first = await apiUpload(page, programId, "before.nc", zigzagProgram(tag, 1200));
    const second = await apiUpload(page, programId, "after.nc", zigzagProgram(tag, 1200, { at: 900, text: "G0 Z-3" }));
    await waitChecked(page, second);
    await waitChecked(page, first);

    await page.goto(appUrl(`/revisions/${second}`));
    await page.getByTestId("code-scroll").waitFor({ timeout: 30_000 });
    await expect(page.locator('[data-testid="code-pane"] [data-line="900"]').count()).resolves.toBe(0);
    await page.locator('[data-finding-line="900"]').click();
    const row = page.locator('[data-testid="code-pane"] [data-line="900"][data-selected]');
    await row.waitFor();
    await expect(row.innerText()).resolves.toContain("G0 Z-3");
    const pane = (await page.getByTestId("code-scroll").boundingBox())!;
    const box = (await row.boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(pane.y);
    expect(box.y + box.height).toBeLessThanOrEqual(pane.y + pane.height);
    // Only a window of rows exists in the page, never one per line.
    expect(await page.locator('[data-testid="code-pane"] [data-line]').count()).toBeLessThan(200);

    await page.goto(appUrl(programPath));
    await page.getByLabel("From", { exact: true }).selectOption({ label: "Revision 1 (draft)" });
    await page.getByLabel("To", { exact: true }).selectOption({ label: "Revision 2 (draft)" });
    await page.getByRole("button", { name: "Compare" }).click();
    await page.waitForURL((u) => u.pathname === `/revisions/${first}/compare/${second}`);
    const added = page.locator('[data-testid="line-diff"] [data-kind="added"]');
    await added.first().waitFor();
    await expect(added.first().innerText()).resolves.toContain("G0 Z-3");
    await expect(added.first().getAttribute("data-b")).resolves.toBe("900");
    await expect(page.getByTestId("diff-counts").innerText()).resolves.toContain("1 line added");
    await page.getByTestId("findings-new").getByText(/below safe Z/).waitFor();
  });
});

describe("vault pages refuse and miss with the right status", () => {
  const b = useFreshPage();

  it("answers 403 with the refusal for a programmer-only or admin-only page, and the missing page for an unknown id", async () => {
    const { page } = b;
    await signIn(page, "operator@cyclegate.test");
    for (const path of ["/programs/new", "/admin/outbox"]) {
      const res = await page.request.get(appUrl(path), { maxRedirects: 0 });
      expect(res.status(), path).toBe(403);
      expect(await res.text()).toContain("Not for your role");
    }
    await page.goto(appUrl("/programs/2147483647"));
    await page.getByText("Program not found").waitFor();
    await page.goto(appUrl("/revisions/2147483647"));
    await page.getByText("Revision not found").waitFor();
    await page.goto(appUrl("/revisions/abc/compare/1"));
    await page.getByText("Revision to compare not found").waitFor();
  });
});
