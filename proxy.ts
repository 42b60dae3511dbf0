import { NextResponse, type NextRequest } from "next/server";

const SESSION_COOKIE = "cg_session";

/**
 * A convenience only: signed-out page requests go to sign-in. Every page, action and route handler
 * checks the session and role itself. API routes are left out so they answer 401 JSON.
 */
export function proxy(request: NextRequest) {
  const { pathname, search } = request.nextUrl;
  const requestHeaders = new Headers(request.headers);
  requestHeaders.set("x-cyclegate-path", pathname + search);
  if (!request.cookies.has(SESSION_COOKIE) && pathname !== "/sign-in") {
    const url = request.nextUrl.clone();
    url.pathname = "/sign-in";
    url.search = `?next=${encodeURIComponent(pathname + search)}`;
    return NextResponse.redirect(url);
  }
  return NextResponse.next({ request: { headers: requestHeaders } });
}

// `api/` stays out of the matcher: besides answering 401 JSON, upload routes must never pass through the proxy,
// because Next buffers a proxied request body up to 10 MB and then hands it on cut short without an error.
export const config = {
  matcher: ["/((?!api/|_next/|favicon.ico|fonts/|.*\\.(?:png|svg|ico|woff2)$).*)"],
};
