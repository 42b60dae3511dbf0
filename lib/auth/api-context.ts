import "server-only";
import { AsyncLocalStorage } from "node:async_hooks";

/**
 * Marks the code running inside a JSON route handler (lib/http.ts `route()` enters it). Only there does the session
 * lookup accept `Authorization: Bearer <API token>`; pages and server actions never see a token.
 */
const store = new AsyncLocalStorage<{ request: Request }>();

export function runAsApiRequest<T>(request: Request, fn: () => Promise<T>): Promise<T> {
  return store.run({ request }, fn);
}

/** The bearer token of the current JSON API request, or null (none sent, or not an API request). */
export function apiBearerToken(): string | null {
  const request = store.getStore()?.request;
  const header = request?.headers.get("authorization");
  if (!header) return null;
  const m = /^Bearer\s+(\S+)\s*$/i.exec(header);
  return m ? m[1]! : "";
}
