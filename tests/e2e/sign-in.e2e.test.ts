import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, it } from "vitest";
import { appUrl, DEMO_PASSWORD, DEMO_USERS, launchBrowser, newContext, pageAlerts, signIn, submitSignIn } from "./browser";

interface SessionUser {
  email: string;
  name: string;
  role: string;
}

/** The signed-in user as the API reports it, through the page's own cookie. */
async function currentUser(page: Page): Promise<{ status: number; user?: SessionUser }> {
  const response = await page.request.get(appUrl("/api/session"));
  if (!response.ok()) return { status: response.status() };
  const body = (await response.json()) as { user: SessionUser };
  return { status: response.status(), user: body.user };
}

describe("sign-in page", () => {
  let browser: Browser;
  let context: BrowserContext;
  let page: Page;

  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });
  beforeEach(async () => {
    context = await newContext(browser);
    page = await context.newPage();
  });
  afterEach(async () => {
    await context?.close();
  });

  it("sends a signed-out visitor of / to the sign-in page", async () => {
    await page.goto(appUrl("/"));
    await page.waitForURL((url) => url.pathname === "/sign-in");
    await expect(page.getByRole("button", { name: "Sign in", exact: true }).isVisible()).resolves.toBe(true);
  });

  for (const { email, role } of DEMO_USERS) {
    it(`signs in ${email} and shows their name in the header`, async () => {
      await signIn(page, email);
      expect(new URL(page.url()).pathname).toBe("/");

      const { status, user } = await currentUser(page);
      expect(status).toBe(200);
      expect(user?.email).toBe(email);
      expect(user?.role).toBe(role);
      expect(user?.name.trim().length).toBeGreaterThan(0);
      await expect(page.getByTestId("current-user").innerText()).resolves.toContain(user?.name);
    });
  }

  it("refuses a wrong password with an error and stays on the sign-in page", async () => {
    await submitSignIn(page, "operator@cyclegate.test", `${DEMO_PASSWORD}-wrong`);
    const alert = pageAlerts(page).filter({ hasText: /\S/ }).first();
    await alert.waitFor({ state: "visible" });
    expect((await alert.innerText()).trim().length).toBeGreaterThan(0);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await expect(currentUser(page)).resolves.toEqual({ status: 401 });
  });

  it("signs out from the header and ends the session", async () => {
    await signIn(page, "programmer@cyclegate.test");
    await page.getByTestId("current-user").waitFor();
    await page.getByRole("button", { name: "Sign out", exact: true }).click();
    await page.waitForURL((url) => url.pathname === "/sign-in");
    await expect(currentUser(page)).resolves.toEqual({ status: 401 });

    await page.goto(appUrl("/"));
    await page.waitForURL((url) => url.pathname === "/sign-in");
  });
});
