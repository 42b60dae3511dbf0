import { beforeEach, describe, expect, it } from "vitest";
import { appUrl, newContext, pageAlerts, signIn, useFreshPage } from "./browser";

const unique = () => Math.random().toString(36).slice(2, 8);

describe("admin pages in the browser", () => {
  const b = useFreshPage();
  beforeEach(async () => {
    await signIn(b.page, "admin@cyclegate.test");
  });

  it("shows each bad machine field's error next to it, then adds the machine once corrected", async () => {
    const name = `Router ${unique()}`;
    await b.page.goto(appUrl("/admin/machines/new"));
    await b.page.getByLabel("Name", { exact: true }).fill(name);
    await b.page.getByLabel("X travel min").fill("10");
    await b.page.getByLabel("X travel max").fill("0");
    await b.page.getByRole("button", { name: "Add machine" }).click();
    await b.page.locator("#travelXMax-error").getByText("X max must be above X min.").waitFor();
    await expect(b.page.getByLabel("X travel max").getAttribute("aria-invalid")).resolves.toBe("true");
    await expect(b.page.locator("#rapidRate-error").innerText()).resolves.toMatch(/number/);
    // What was typed survives the failed submit.
    await expect(b.page.getByLabel("Name", { exact: true }).inputValue()).resolves.toBe(name);

    const values: Record<string, string> = {
      "X travel min": "-500", "X travel max": "0", "Y travel min": "-300", "Y travel max": "0",
      "Z travel min": "-400", "Z travel max": "0", "Rapid rate (per min)": "15000", "Max cutting feed (per min)": "6000",
      "Max spindle speed (rpm)": "12000", "Acceleration (per s²)": "1500", "Tool change time (s)": "6",
      "Default safe Z above part zero": "8", "Work offsets on the control": "6",
    };
    for (const [label, v] of Object.entries(values)) await b.page.getByLabel(label, { exact: true }).fill(v);
    await b.page.getByLabel("Dialect").selectOption("strict-ngc");
    await b.page.getByLabel("Arc radius tolerance").fill("0.01");
    await b.page.getByRole("button", { name: "Add machine" }).click();
    await b.page.waitForURL((u) => u.pathname === "/machines");
    await b.page.getByRole("cell", { name }).first().waitFor();
    // The edit form shows what was saved.
    await b.page.getByRole("row").filter({ hasText: name }).getByRole("link", { name: "Edit" }).click();
    await b.page.waitForURL((u) => /^\/admin\/machines\/\d+$/.test(u.pathname));
    await expect(b.page.getByLabel("Dialect").inputValue()).resolves.toBe("strict-ngc");
    await expect(b.page.getByLabel("Arc radius tolerance").inputValue()).resolves.toBe("0.01");
  });

  it("creates a user who can then sign in, and disabling them ends their open session", async () => {
    const email = `floor-${unique()}@cyclegate.test`;
    await b.page.goto(appUrl("/admin/users/new"));
    await b.page.getByLabel("Email", { exact: true }).fill(email);
    await b.page.getByLabel("Display name").fill("Pat Floor");
    await b.page.getByLabel("Role").selectOption("operator");
    await b.page.getByLabel("First password").fill("short");
    await b.page.getByRole("button", { name: "Create user" }).click();
    await b.page.locator("#password-error").getByText(/12/).waitFor();
    await b.page.getByLabel("First password").fill("a-good-long-password");
    await b.page.getByRole("button", { name: "Create user" }).click();
    await b.page.waitForURL((u) => /^\/admin\/users\/\d+$/.test(u.pathname));

    const theirContext = await newContext(b.browser);
    const theirs = await theirContext.newPage();
    await signIn(theirs, email, "a-good-long-password");
    await expect(theirs.getByTestId("current-user").innerText()).resolves.toContain("Pat Floor");

    await b.page.getByRole("button", { name: "Disable user" }).click();
    await b.page.getByRole("status").getByText(/disabled/).waitFor();
    const res = await theirs.request.get(appUrl("/api/session"));
    expect(res.status()).toBe(401);
    await theirs.goto(appUrl("/machines"));
    await theirs.waitForURL((u) => u.pathname === "/sign-in");
    await theirContext.close();
  });

  it("filters the audit record by action", async () => {
    await b.page.goto(appUrl("/audit?action=session.sign-in"));
    const rows = b.page.locator("tbody tr");
    await rows.first().waitFor();
    const actions = await b.page.locator("tbody tr td:nth-child(3)").allInnerTexts();
    expect(actions.length).toBeGreaterThan(0);
    expect(actions.every((a) => a.startsWith("session.sign-in"))).toBe(true);
    await expect(pageAlerts(b.page).count()).resolves.toBe(0);
  });

  it("an operator gets a refusal on admin pages, not the page", async () => {
    const ctx = await newContext(b.browser);
    const op = await ctx.newPage();
    await signIn(op, "operator@cyclegate.test");
    await op.goto(appUrl("/admin/users"));
    await op.getByRole("heading", { name: "Not for your role" }).waitFor();
    expect(await op.locator("table").count()).toBe(0);
    await ctx.close();
  });
});
