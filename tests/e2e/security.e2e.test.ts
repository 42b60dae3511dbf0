/**
 * The running app as an attacker on the shop network meets it (issue 8): the redirect after sign-in
 * (item 1), security headers and framing (item 4), unsupported methods and oversized action bodies
 * (item 8) and refused pages (item 9). Everything goes through the real server and Debian's chromium.
 */
import { createServer, request, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiSignIn, appUrl, BASE_URL, DEMO_PASSWORD, signIn, submitSignIn, useFreshPage } from "./browser";

const APP_ORIGIN = new URL(BASE_URL).origin;

/** A plain HTTP exchange, for methods and bodies fetch() refuses to send (TRACE, a wrong Content-Length). */
function rawRequest(
  method: string,
  path: string,
  headers: Record<string, string> = {},
  body?: Buffer,
): Promise<{ status: number; headers: Record<string, string | string[] | undefined>; text: string }> {
  const url = new URL(appUrl(path));
  return new Promise((resolve, reject) => {
    const req = request(
      { host: "127.0.0.1", port: url.port, path: url.pathname + url.search, method, headers: { host: url.host, ...headers } },
      (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () => resolve({ status: res.statusCode ?? 0, headers: res.headers, text: Buffer.concat(chunks).toString("utf8") }));
      },
    );
    req.on("error", (e) => ((e as NodeJS.ErrnoException).code === "ECONNRESET" ? resolve({ status: 0, headers: {}, text: "" }) : reject(e)));
    if (body) req.write(body);
    req.end();
  });
}

/** A small server of our own on another port of localhost: same site as the app, another origin. */
async function sideServer(html: (port: number) => string): Promise<{ server: Server; port: number; hits: string[] }> {
  const hits: string[] = [];
  let port = 0;
  const server = createServer((req, res) => {
    hits.push(req.url ?? "");
    res.writeHead(200, { "content-type": "text/html" });
    res.end(html(port));
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  port = (server.address() as AddressInfo).port;
  return { server, port, hits };
}

describe("security headers on every answer (item 4)", () => {
  const REQUIRED_DIRECTIVES = [
    "default-src 'self'",
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    "font-src 'self'",
    "connect-src 'self'",
    "worker-src 'self' blob:",
    "img-src 'self' data: blob:",
  ];

  function checkHeaders(what: string, h: Headers) {
    const csp = h.get("content-security-policy") ?? "";
    for (const d of REQUIRED_DIRECTIVES) expect(csp, `${what}: ${d}`).toContain(d);
    expect(csp, what).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]{16,}' 'strict-dynamic'/);
    expect(csp, what).not.toContain("unsafe-eval");
    expect(h.get("x-frame-options"), what).toBe("DENY");
    expect(h.get("x-content-type-options"), what).toBe("nosniff");
    expect(h.get("referrer-policy"), what).toBe("same-origin");
    expect(h.get("cross-origin-opener-policy"), what).toBe("same-origin");
    expect(h.get("permissions-policy"), what).toContain("camera=()");
  }

  it("a signed-in page, a JSON answer, an error page, a refusal and a static file all carry them", async () => {
    const cookie = await apiSignIn("admin@cyclegate.test");
    const page = await fetch(appUrl("/machines"), { headers: { cookie } });
    const json = await fetch(appUrl("/api/machines"), { headers: { cookie } });
    const missing = await fetch(appUrl("/no-such-page-here"), { headers: { cookie } });
    const anon = await fetch(appUrl("/api/users"));
    const signInPage = await fetch(appUrl("/sign-in"));
    const html = await signInPage.text();
    const script = /<script src="(\/_next\/static\/[^"]+\.js)"/.exec(html)?.[1];
    expect(script).toBeDefined();
    const asset = await fetch(appUrl(script!));

    expect([page.status, json.status, missing.status, anon.status, signInPage.status, asset.status]).toEqual([200, 200, 404, 401, 200, 200]);
    for (const [what, res] of Object.entries({ page, json, missing, anon, signInPage, asset })) checkHeaders(what, res.headers);
    // Signed-in answers are never stored; the build's hashed files may be.
    expect(page.headers.get("cache-control")).toContain("no-store");
    expect(json.headers.get("cache-control")).toContain("no-store");
    expect(anon.headers.get("cache-control")).toContain("no-store");
    expect(asset.headers.get("cache-control")).toContain("immutable");
  });

  it("each page gets a fresh nonce, and its own scripts carry it", async () => {
    const [a, b] = await Promise.all([fetch(appUrl("/sign-in")), fetch(appUrl("/sign-in"))]);
    const nonce = (r: Response) => /'nonce-([^']+)'/.exec(r.headers.get("content-security-policy") ?? "")?.[1];
    expect(nonce(a)).toBeTruthy();
    expect(nonce(a)).not.toBe(nonce(b));
    const html = await a.text();
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce(a)}"`);
  });

  it("methods the app does not serve (TRACE and the like) are 405 with Allow, headers included (item 8)", async () => {
    for (const [method, path] of [["DELETE", "/sign-in"], ["OPTIONS", "/machines"], ["PUT", "/"]]) {
      const res = await rawRequest(method!, path!);
      expect(res.status, `${method} ${path}`).toBe(405);
      expect(res.headers.allow).toBe("GET, HEAD, POST");
    }
    for (const path of ["/", "/sign-in", "/api/health", "/api/session"]) {
      for (const method of ["TRACE", "PROPFIND", "MKCOL"]) {
        const res = await rawRequest(method, path);
        expect(res.status, `${method} ${path}`).toBe(405);
        expect(String(res.headers.allow)).toContain("GET");
        expect(res.headers["x-frame-options"]).toBe("DENY");
        expect(JSON.parse(res.text)).toEqual({ error: `${method} is not supported here.` });
      }
    }
  });
});

describe("in the browser (items 1 and 4)", () => {
  const b = useFreshPage();

  /** Every report of a blocked resource or script, from the console and the page's own event. */
  async function watchViolations(page: Page): Promise<string[]> {
    const seen: string[] = [];
    page.on("console", (m) => {
      if (/Content Security Policy|Refused to/i.test(m.text())) seen.push(m.text());
    });
    await page.addInitScript(() => {
      document.addEventListener("securitypolicyviolation", (e) => {
        console.error(`Refused to load (securitypolicyviolation): ${e.violatedDirective} ${e.blockedURI}`);
      });
    });
    return seen;
  }

  /** True once React has hydrated something on the page, i.e. the page's scripts ran. */
  const hydrated = (page: Page) =>
    page.waitForFunction(() => [...document.querySelectorAll("a, button, form")].some((el) => Object.keys(el).some((k) => k.startsWith("__react"))), undefined, {
      timeout: 15_000,
    });

  it("every page loads and hydrates with no CSP violation; a blob worker, data: images, the app's font and its API work; eval does not", async () => {
    const seen = await watchViolations(b.page);
    await b.page.goto(appUrl("/sign-in"));
    await hydrated(b.page);
    await signIn(b.page, "admin@cyclegate.test");
    for (const path of ["/", "/machines", "/admin/users", "/admin/users/new", "/admin/machines/new", "/admin/machines/1", "/audit", "/account", "/runs", "/revisions/1/run", "/no-such-page-here"]) {
      await b.page.goto(appUrl(path));
      await hydrated(b.page);
    }
    const probe = await b.page.evaluate(async () => {
      const worker = new Worker(URL.createObjectURL(new Blob(["postMessage(6 * 7)"], { type: "text/javascript" })));
      const fromWorker = await new Promise((resolve) => {
        worker.onmessage = (e) => resolve(e.data);
        worker.onerror = () => resolve("worker refused");
      });
      const img = new Image();
      img.src = "data:image/gif;base64,R0lGODlhAQABAAAAACH5BAEKAAEALAAAAAABAAEAAAICTAEAOw==";
      await img.decode();
      await document.fonts.ready;
      const fontLoaded = [...document.fonts].some((f) => f.status === "loaded");
      const api = (await fetch("/api/session")).status;
      let evalRefused = false;
      try {
        (0, eval)("1 + 1");
      } catch {
        evalRefused = true;
      }
      return { fromWorker, imageWidth: img.naturalWidth, fontLoaded, api, evalRefused };
    });
    expect(probe).toEqual({ fromWorker: 42, imageWidth: 1, fontLoaded: true, api: 200, evalRefused: true });
    // eval's refusal is itself reported; nothing else may be.
    expect(seen.filter((s) => !/unsafe-eval|script-src.*eval|'eval'/i.test(s) && !/\beval\b/i.test(s))).toEqual([]);
  });

  it("a page served on another port of this host cannot write through the JSON API with the user's cookie", async () => {
    await signIn(b.page, "programmer@cyclegate.test");
    const revisionCount = async () => {
      const res = await b.page.request.get(appUrl("/api/programs/1"));
      expect(res.status()).toBe(200);
      return ((await res.json()) as { program: { revisions: unknown[] } }).program.revisions.length;
    };
    const before = await revisionCount();
    const target = appUrl("/api/programs/1/revisions");
    // SameSite=Lax lets the cookie ride along: another port of this host is the same site. A simple fetch (no
    // preflight) and a plain multipart form, the two writes a page can make without the app's consent.
    const attacker = await sideServer(
      () => `<!doctype html><title>attacker</title>
<form id="f" method="post" enctype="multipart/form-data" action="${target}" target="sink"><input type="hidden" name="x" value="1"></form>
<iframe name="sink"></iframe>
<script>
fetch(${JSON.stringify(target)}, { method: "POST", mode: "no-cors", credentials: "include", headers: { "content-type": "text/plain" }, body: "G0 X0 Y0\\nM30\\n" })
  .finally(() => { document.getElementById("f").submit(); setTimeout(() => { document.title = "sent"; }, 1500); });
</script>`,
    );
    try {
      await b.page.goto(`http://localhost:${attacker.port}/`);
      await b.page.waitForFunction(() => document.title === "sent", undefined, { timeout: 15_000 });
    } finally {
      attacker.server.close();
    }
    expect(await revisionCount()).toBe(before);
    // The same upload from the app's own page goes through, so the refusal above is the origin check at work.
    await b.page.goto(appUrl("/programs/1"));
    const status = await b.page.evaluate(
      (url) => fetch(url, { method: "POST", headers: { "content-type": "text/plain", "x-file-name": "origin-check.nc" }, body: "G0 X0 Y0\nM30\n" }).then((r) => r.status),
      target,
    );
    expect(status).toBe(201);
    expect(await revisionCount()).toBe(before + 1);
  });

  it("a page served on another port of this host cannot frame a signed-in page", async () => {
    await signIn(b.page, "admin@cyclegate.test");
    const framer = await sideServer(
      () => `<!doctype html><title>framer</title><iframe id="f" src="${appUrl("/admin/users")}" width="800" height="600"></iframe>
<script>document.getElementById("f").onload = () => { document.title = "frame loaded"; };</script>`,
    );
    try {
      const consoleLines: string[] = [];
      b.page.on("console", (m) => consoleLines.push(m.text()));
      await b.page.goto(`http://localhost:${framer.port}/`);
      await b.page.waitForFunction(() => document.title === "frame loaded", undefined, { timeout: 15_000 });
      const child = b.page.frames().find((f) => f !== b.page.mainFrame());
      expect(child).toBeDefined();
      const text = await child!.evaluate(() => document.body?.innerText ?? "").catch(() => "");
      expect(text).not.toContain("Add user");
      expect(text).not.toContain("admin@cyclegate.test");
      // The same page opened directly is the signed-in users list: the frame was refused, not signed out.
      await b.page.goto(appUrl("/admin/users"));
      await b.page.getByRole("link", { name: "Add user" }).waitFor();
    } finally {
      framer.server.close();
    }
  });

  describe("the way back after sign-in never leaves the app (item 1)", () => {
    let evil: Awaited<ReturnType<typeof sideServer>>;
    beforeAll(async () => {
      evil = await sideServer(() => "<!doctype html><title>elsewhere</title><h1>Somewhere else</h1>");
    });
    afterAll(() => evil.server.close());

    for (const shape of ["/%09/localhost:PORT/", "/%09%5Clocalhost:PORT/", "/.//localhost:PORT/", "/%0a/localhost:PORT/", "/%5C%09localhost:PORT/"]) {
      it(`next=${shape}`, async () => {
        evil.hits.length = 0;
        const next = shape.replace("PORT", String(evil.port));
        await b.page.goto(appUrl(`/sign-in?next=${next}`));
        await b.page.getByLabel("Email", { exact: true }).fill("operator@cyclegate.test");
        await b.page.getByLabel("Password", { exact: true }).fill(DEMO_PASSWORD);
        await b.page.getByRole("button", { name: "Sign in", exact: true }).click();
        await b.page.waitForURL((u) => u.pathname === "/" || u.origin !== APP_ORIGIN, { timeout: 30_000 });
        await b.page.waitForLoadState("load");
        expect(new URL(b.page.url()).origin).toBe(APP_ORIGIN);
        expect(new URL(b.page.url()).pathname).toBe("/");
        expect(evil.hits).toEqual([]);
      });
    }

    it("a path inside the app is kept", async () => {
      await b.page.goto(appUrl(`/sign-in?next=${encodeURIComponent("/machines?x=1")}`));
      await b.page.getByLabel("Email", { exact: true }).fill("operator@cyclegate.test");
      await b.page.getByLabel("Password", { exact: true }).fill(DEMO_PASSWORD);
      await b.page.getByRole("button", { name: "Sign in", exact: true }).click();
      await b.page.waitForURL((u) => u.pathname === "/machines");
      expect(new URL(b.page.url()).search).toBe("?x=1");
    });
  });

  /** A fresh operator account, made through the admin API, so throttling it upsets no other test. */
  async function freshOperator(): Promise<{ email: string; password: string }> {
    const admin = await apiSignIn("admin@cyclegate.test");
    const email = `throttle-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 6)}@cyclegate.test`;
    const password = "a-long-enough-password";
    const res = await fetch(appUrl("/api/users"), {
      method: "POST",
      headers: { "content-type": "application/json", cookie: admin },
      body: JSON.stringify({ email, displayName: "Throttle Test", role: "operator", password }),
    });
    expect(res.status).toBe(201);
    return { email, password };
  }

  const formAlert = (page: Page) => page.locator('[role="alert"]:not(#__next-route-announcer__)').filter({ hasText: /\S/ }).first();

  it("the sign-in form says how long to wait once the limit is reached (items 2 and 6)", async () => {
    const u = await freshOperator();
    for (let i = 0; i < 5; i++) {
      await submitSignIn(b.page, u.email, `not-it-${i}`);
      await expect(formAlert(b.page).innerText()).resolves.toBe("The e-mail or the password is wrong.");
    }
    await submitSignIn(b.page, u.email, u.password);
    await expect(formAlert(b.page).innerText()).resolves.toMatch(/^Too many failed tries\. Try again in \d+ s\.$/);
  });

  it("wrong current passwords on the account page are throttled like sign-ins (item 3)", async () => {
    const u = await freshOperator();
    await signIn(b.page, u.email, u.password);
    await b.page.goto(appUrl("/account"));
    const attempt = async (current: string, expected: string | RegExp) => {
      await b.page.getByLabel("Current password").fill(current);
      await b.page.getByLabel("New password", { exact: true }).fill("a-fine-new-password");
      await b.page.getByLabel("Repeat new password").fill("a-fine-new-password");
      await Promise.all([
        b.page.waitForResponse((r) => r.request().method() === "POST" && new URL(r.url()).pathname === "/account"),
        b.page.getByRole("button", { name: "Change password" }).click(),
      ]);
      await expect.poll(() => formAlert(b.page).innerText()).toMatch(expected);
      // The alert reads the same after each wrong try, so also wait for this try's answer to be rendered: React
      // resets the form once the action has finished; filling before that would lose the next try's fields.
      await expect.poll(() => b.page.getByLabel("Current password").inputValue()).toBe("");
      await expect.poll(() => b.page.getByRole("button", { name: "Change password" }).isEnabled()).toBe(true);
    };
    for (let i = 0; i < 5; i++) await attempt(`not-mine-${i}`, /^The password is wrong\.$/);
    await attempt(u.password, /^Too many failed tries\. Try again in \d+ s\.$/);
    // Still signed in, password unchanged.
    await expect(b.page.getByTestId("current-user").innerText()).resolves.toContain("Throttle Test");
  });

  it("a server action body over 1 MB is a 413, not a 500 (item 8)", async () => {
    let actionId = "";
    b.page.on("request", (r) => {
      const id = r.headers()["next-action"];
      if (id) actionId = id;
    });
    await b.page.goto(appUrl("/sign-in"));
    await b.page.getByLabel("Email", { exact: true }).fill("nobody@cyclegate.test");
    await b.page.getByLabel("Password", { exact: true }).fill("not-the-password");
    await b.page.getByRole("button", { name: "Sign in", exact: true }).click();
    await b.page.getByRole("alert").filter({ hasText: /\S/ }).first().waitFor();
    expect(actionId).toMatch(/^[0-9a-f]{20,}$/);

    const boundary = "----cyclegate-test";
    const big = Buffer.from(
      `--${boundary}\r\nContent-Disposition: form-data; name="1_email"\r\n\r\n${"a".repeat(1_200_000)}\r\n--${boundary}--\r\n`,
    );
    const res = await rawRequest(
      "POST",
      "/sign-in",
      { "next-action": actionId, "content-type": `multipart/form-data; boundary=${boundary}`, "content-length": String(big.length), origin: APP_ORIGIN },
      big,
    );
    expect(res.status).toBe(413);
    expect(JSON.parse(res.text)).toEqual({ error: "The request body is too large (at most 1 MB)." });
  });
});

describe("refused pages answer 403 with the refusal (item 9)", () => {
  it("each admin or lead page, for a role without access", async () => {
    const operator = await apiSignIn("operator@cyclegate.test");
    for (const path of ["/admin/users", "/admin/users/new", "/admin/users/1", "/admin/machines/new", "/admin/machines/1", "/audit"]) {
      const res = await fetch(appUrl(path), { headers: { cookie: operator }, redirect: "manual" });
      expect(res.status, path).toBe(403);
      const html = await res.text();
      expect(html).toContain("Not for your role");
      expect(html).not.toContain("admin@cyclegate.test");
    }
    const admin = await apiSignIn("admin@cyclegate.test");
    expect((await fetch(appUrl("/admin/users"), { headers: { cookie: admin } })).status).toBe(200);
    expect((await fetch(appUrl("/admin/users/999999"), { headers: { cookie: admin } })).status).toBe(404);
  });
});
