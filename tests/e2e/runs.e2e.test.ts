/**
 * The check before cycle start on a shop tablet: the operator opens the released revision's run page from the
 * overview, taps every box, signs with the password, and the run is in the record and on the program page. A
 * superseded revision's run page refuses to run and leads to the released one.
 */
import type { BrowserContext, Page } from "playwright-core";
import { afterEach, describe, expect, it } from "vitest";
import { appUrl, DEMO_PASSWORD, pageAlerts, signIn, useFreshPage } from "./browser";

const TABLET = { viewport: { width: 1024, height: 768 }, hasTouch: true };

describe("the run page on a tablet", () => {
  const b = useFreshPage();
  let tablet: BrowserContext | null = null;
  afterEach(async () => {
    await tablet?.close();
    tablet = null;
  });

  async function tabletPage(): Promise<Page> {
    tablet = await b.browser.newContext(TABLET);
    return tablet.newPage();
  }

  it("the operator taps every check, signs with the password, and the run is on /runs and on the program page", async () => {
    const page = await tabletPage();
    await signIn(page, "operator@cyclegate.test");
    // The two-vise bracket on the bench mill, from the overview's released programs.
    await page.locator('[data-machine="Bench mill 1"] [data-program="O2207"]').getByTestId("check-before-cycle-start").tap();
    await page.waitForURL((u) => /^\/revisions\/\d+\/run$/.test(u.pathname));
    const revisionId = Number(new URL(page.url()).pathname.split("/")[2]);
    await expect(page.getByTestId("run-verdict").innerText()).resolves.toMatch(/This is the released revision of O2207/);
    await expect(page.getByTestId("identity-program").innerText()).resolves.toBe("O2207");
    await expect(page.getByTestId("program-header").innerText()).resolves.toContain("SENSOR BRACKET");
    const groups = await page.getByTestId("sha-groups").locator("span").allInnerTexts();
    expect(groups).toHaveLength(16);
    const sha = groups.join("");

    // Touch-sized rows (at least 48 px high), one per work offset and tool, in load order.
    const identityBox = await page.getByTestId("check-identity").boundingBox();
    expect(identityBox!.height).toBeGreaterThanOrEqual(48);
    const offsets = page.locator('[data-testid^="check-offset-"]');
    const tools = page.locator('[data-testid^="check-tool-"]');
    expect(await offsets.count()).toBe(2);
    expect(await tools.evaluateAll((els) => els.map((e) => e.getAttribute("data-testid")))).toEqual(["check-tool-1", "check-tool-2", "check-tool-3", "check-tool-4"]);
    await expect(page.getByTestId("offset-value-G54").innerText()).resolves.toMatch(/X -262\.415/);

    // Signing with boxes left open is refused by the server, naming what is missing.
    await page.getByTestId("check-identity").tap();
    await page.getByLabel("Your password, to sign").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: /^Sign off O2207 revision 1$/ }).tap();
    await pageAlerts(page).getByText(/Every check must be ticked/).waitFor();
    await page.getByText(/Not ticked: G54, G55/).waitFor();
    await expect(page.getByTestId("check-identity").getAttribute("data-checked")).resolves.toBe("true");

    for (const row of [...(await offsets.all()), ...(await tools.all())]) await row.tap();
    await page.getByTestId("check-dry-run").tap();
    await expect(page.getByTestId("check-count").innerText()).resolves.toMatch(/8 of 8 checks ticked/);
    await page.getByLabel("Parts planned for this run (optional)").fill("20");
    await page.getByLabel("Your password, to sign").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: /^Sign off O2207 revision 1$/ }).tap();
    await page.getByTestId("run-signed").waitFor({ timeout: 30_000 });
    const runId = Number(new URL(page.url()).searchParams.get("signed"));
    expect(runId).toBeGreaterThan(0);
    await expect(page.getByTestId("run-signed").innerText()).resolves.toContain(sha);

    await page.goto(appUrl("/runs"));
    const row = page.locator(`[data-run="${runId}"]`);
    await row.waitFor();
    await expect(row.innerText()).resolves.toMatch(/O2207 rev 1[\s\S]*Bench mill 1[\s\S]*Kofi Lindqvist[\s\S]*20/);
    // Newest first.
    await expect(page.locator("[data-run]").first().getAttribute("data-run")).resolves.toBe(String(runId));
    await row.getByRole("link", { name: "O2207 rev 1" }).tap();
    await page.waitForURL((u) => u.pathname === `/revisions/${revisionId}`);
    await page.getByRole("link", { name: "O2207", exact: true }).first().tap();
    await page.waitForURL((u) => /^\/programs\/\d+$/.test(u.pathname));
    await page.getByTestId("program-runs").locator(`[data-run="${runId}"]`).waitFor();
    await page.locator('[data-action="run.signed-off"]').first().waitFor();
  });

  it("a superseded revision's run page refuses to run and leads to the released revision", async () => {
    const page = await tabletPage();
    await signIn(page, "operator@cyclegate.test");
    const list = (await (await page.request.get(appUrl("/api/programs?program=O1184"))).json()) as { programs: { id: number }[] };
    const program = (await (await page.request.get(appUrl(`/api/programs/${list.programs[0]!.id}`))).json()) as {
      program: { releasedRevisionId: number; revisions: { id: number; status: string }[] };
    };
    const superseded = program.program.revisions.find((r) => r.status === "superseded")!;
    await page.goto(appUrl(`/revisions/${superseded.id}/run`));
    const refusal = page.getByTestId("run-refusal");
    await expect(refusal.innerText()).resolves.toMatch(/Do not run this revision[\s\S]*superseded by revision 2/);
    expect(await page.getByRole("button", { name: /^Sign off/ }).count()).toBe(0);
    expect(await page.locator('input[type="checkbox"]').count()).toBe(0);
    await refusal.getByTestId("to-released").tap();
    await page.waitForURL((u) => u.pathname === `/revisions/${program.program.releasedRevisionId}/run`);
    await expect(page.getByTestId("run-verdict").innerText()).resolves.toMatch(/This is the released revision of O1184/);
  });

  it("a programmer reads the checklist but has nothing to sign", async () => {
    const page = await tabletPage();
    await signIn(page, "programmer@cyclegate.test");
    await page.goto(appUrl("/runs?program=O2207"));
    const first = page.locator("[data-run]").first();
    await first.waitFor();
    await first.getByRole("link").first().tap();
    await page.waitForURL((u) => /^\/revisions\/\d+$/.test(u.pathname));
    await page.goto(`${page.url()}/run`);
    await page.getByTestId("no-sign-off").waitFor();
    expect(await page.getByRole("button", { name: /^Sign off/ }).count()).toBe(0);
    expect(await page.locator('input[type="checkbox"]:not([disabled])').count()).toBe(0);
  });
});
