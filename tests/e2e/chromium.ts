/**
 * Debian's chromium for playwright-core, headless with WebGL through SwiftShader: the browser tests and
 * `npm run bench:viewer` launch it the same way. No vitest here, so scripts import it too.
 */
import { existsSync } from "node:fs";
import { chromium, type Browser } from "playwright-core";

/** The binary itself skips the /usr/bin/chromium wrapper script and its harmless shell warning. */
export function chromiumPath(): string {
  if (existsSync("/usr/lib/chromium/chromium")) return "/usr/lib/chromium/chromium";
  if (existsSync("/usr/bin/chromium")) return "/usr/bin/chromium";
  throw new Error("Debian's chromium is missing: apt-get install -y chromium (npm test installs it)");
}

/** Headless, no background network traffic, WebGL through the CPU renderer. */
export const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--enable-unsafe-swiftshader",
];

/** Launches chromium with a fresh profile; `extra` arguments come after the common ones. */
export function launchChromium(extra: string[] = []): Promise<Browser> {
  return chromium.launch({ executablePath: chromiumPath(), args: [...CHROMIUM_ARGS, ...extra] });
}
