import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { appUrl, DEMO_PASSWORD, DEMO_USERS, pageAlerts, signIn, submitSignIn, useFreshPage } from "./browser";

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
  const b = useFreshPage();

  it("sends a signed-out visitor of / to the sign-in page", async () => {
    await b.page.goto(appUrl("/"));
    await b.page.waitForURL((url) => url.pathname === "/sign-in");
    await expect(b.page.getByRole("button", { name: "Sign in", exact: true }).isVisible()).resolves.toBe(true);
  });

  for (const { email, role } of DEMO_USERS) {
    it(`signs in ${email} and shows their name in the header`, async () => {
      await signIn(b.page, email);
      expect(new URL(b.page.url()).pathname).toBe("/");

      const { status, user } = await currentUser(b.page);
      expect(status).toBe(200);
      expect(user?.email).toBe(email);
      expect(user?.role).toBe(role);
      expect(user?.name.trim().length).toBeGreaterThan(0);
      await expect(b.page.getByTestId("current-user").innerText()).resolves.toContain(user?.name);
    });
  }

  it("refuses a wrong password with an error and stays on the sign-in page", async () => {
    await submitSignIn(b.page, "operator@cyclegate.test", `${DEMO_PASSWORD}-wrong`);
    const alert = pageAlerts(b.page).filter({ hasText: /\S/ }).first();
    await alert.waitFor({ state: "visible" });
    expect((await alert.innerText()).trim().length).toBeGreaterThan(0);
    expect(new URL(b.page.url()).pathname).toBe("/sign-in");
    await expect(currentUser(b.page)).resolves.toEqual({ status: 401 });
  });

  it("signs out from the header and ends the session", async () => {
    await signIn(b.page, "programmer@cyclegate.test");
    await b.page.getByTestId("current-user").waitFor();
    await b.page.getByRole("button", { name: "Sign out", exact: true }).click();
    await b.page.waitForURL((url) => url.pathname === "/sign-in");
    await expect(currentUser(b.page)).resolves.toEqual({ status: 401 });

    await b.page.goto(appUrl("/"));
    await b.page.waitForURL((url) => url.pathname === "/sign-in");
  });
});
