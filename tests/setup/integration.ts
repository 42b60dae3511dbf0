import { vi } from "vitest";
import { requestContext } from "../integration/request-context";

// Server code reads cookies and headers through next/headers; under vitest each test drives them
// through one in-memory request context instead of a real HTTP request.
vi.mock("next/headers", () => ({
  cookies: async () => requestContext.cookieStore(),
  headers: async () => requestContext.headers(),
}));

// Outside a Next server there is no cache to revalidate.
vi.mock("next/cache", () => ({
  revalidatePath: () => undefined,
  revalidateTag: () => undefined,
}));
