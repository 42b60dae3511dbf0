/**
 * The one check for every redirect to a path the caller chose (the sign-in page's `next`, the
 * sign-in action, anything later that sends the browser "back where it was").
 *
 * Browsers do not read a URL the way a prefix check does: they drop TAB, CR and LF anywhere in it,
 * read "\" as "/", and resolve "/./" and "/../", so "/\t/evil.example", "/\\evil.example" and
 * "/.//evil.example" all leave the site. So the path is resolved as a browser would, against the
 * app's own origin, and kept only when the result is still on that origin, still starts with a
 * single "/", and the input held no control characters or backslashes at all. A newline can then
 * never reach a Location header.
 */

/** Stands in for the app's origin while resolving; only whether the result stays on it matters. */
const APP_ORIGIN = "http://cyclegate.invalid";
const MAX_LENGTH = 2048;
/** C0 controls (TAB, CR, LF, NUL...), DEL, C1 controls, and the backslash browsers read as "/". */
const REFUSED = /[\u0000-\u001f\u007f-\u009f\\]/;

/**
 * `raw` as a path inside the app ("/audit?page=2#top", normalised), or `fallback` when it is not
 * a string, is empty or too long, holds a control character, a backslash or a percent-encoded
 * one of them, or would resolve anywhere but this app.
 */
export function safeRedirectPath(raw: unknown, fallback = "/"): string {
  if (typeof raw !== "string" || raw.length === 0 || raw.length > MAX_LENGTH) return fallback;
  if (!raw.startsWith("/") || REFUSED.test(raw) || REFUSED.test(safeDecode(raw))) return fallback;
  let url: URL;
  try {
    url = new URL(raw, `${APP_ORIGIN}/`);
  } catch {
    return fallback;
  }
  if (url.origin !== APP_ORIGIN) return fallback;
  const path = url.pathname + url.search + url.hash;
  // "/.//host" resolves to the path "//host", which a browser reads as another host.
  if (!path.startsWith("/") || path.startsWith("//")) return fallback;
  return path;
}

function safeDecode(s: string): string {
  try {
    return decodeURIComponent(s);
  } catch {
    return s;
  }
}
