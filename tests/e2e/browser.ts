/**
 * Shared pieces of the browser tests: Debian's chromium driven by playwright-core, pointed at the
 * app that `npm test` started (BASE_URL, default http://localhost:3100).
 */
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, afterEach, beforeAll, beforeEach } from "vitest";
import { launchChromium } from "./chromium";

export { chromiumPath } from "./chromium";

/**
 * Where the app under test listens. Vitest overwrites process.env.BASE_URL with Vite's base path ("/"),
 * so test.sh also exports CYCLEGATE_BASE_URL, which is read first.
 */
export const BASE_URL = pickBaseUrl(process.env.CYCLEGATE_BASE_URL, process.env.BASE_URL);

function pickBaseUrl(...candidates: Array<string | undefined>): string {
  const url = candidates.find((c) => c !== undefined && /^https?:\/\//.test(c)) ?? "http://localhost:3100";
  return url.replace(/\/$/, "");
}

/** An absolute URL on the app. */
export function appUrl(path: string): string {
  return new URL(path, `${BASE_URL}/`).href;
}

/** The password every demo user is seeded with. */
export const DEMO_PASSWORD = process.env.CYCLEGATE_DEMO_PASSWORD || "cyclegate-demo";

export type Role = "admin" | "lead" | "programmer" | "operator";

/** One seeded user per role. */
export const DEMO_USERS: ReadonlyArray<{ email: string; role: Role }> = [
  { email: "admin@cyclegate.test", role: "admin" },
  { email: "lead@cyclegate.test", role: "lead" },
  { email: "programmer@cyclegate.test", role: "programmer" },
  { email: "operator@cyclegate.test", role: "operator" },
];

/** Launches headless chromium with a fresh profile and no background network traffic. */
export function launchBrowser(): Promise<Browser> {
  return launchChromium();
}

/** A context of its own, so cookies never carry over from one test to the next. */
export function newContext(browser: Browser): Promise<BrowserContext> {
  return browser.newContext({ viewport: { width: 1280, height: 800 } });
}

/** Alert regions of the page itself; Next's route announcer also has role="alert". */
export function pageAlerts(page: Page) {
  return page.locator('[role="alert"]:not(#__next-route-announcer__)');
}

/** Fills the real sign-in form and submits it; does not wait for the outcome. */
export async function submitSignIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto(appUrl("/sign-in"));
  await page.getByLabel("Email", { exact: true }).fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
}

/** Signs in through the page and waits for the redirect to "/" and the header's current user. */
export async function signIn(page: Page, email: string, password: string = DEMO_PASSWORD): Promise<void> {
  await submitSignIn(page, email, password);
  await page.waitForURL((url) => url.pathname === "/", { timeout: 30_000 });
  await page.getByTestId("current-user").waitFor({ state: "visible" });
}

/** What useFreshPage hands each test: one browser per file, a fresh context and page per test. */
export interface BrowserHolder {
  browser: Browser;
  context: BrowserContext;
  page: Page;
}

/** Registers the hooks that launch chromium once per file and give every test its own context. */
export function useFreshPage(): BrowserHolder {
  const holder = {} as BrowserHolder;
  beforeAll(async () => {
    holder.browser = await launchBrowser();
  });
  afterAll(async () => {
    await holder.browser?.close();
  });
  beforeEach(async () => {
    holder.context = await newContext(holder.browser);
    holder.page = await holder.context.newPage();
  });
  afterEach(async () => {
    await holder.context?.close();
  });
  return holder;
}

/** Signs in over the JSON API and returns the Cookie header every cookie the answer set makes up. */
export async function apiSignIn(email: string, password: string = DEMO_PASSWORD): Promise<string> {
  const res = await fetch(appUrl("/api/session"), {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}`);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .join("; ");
}
