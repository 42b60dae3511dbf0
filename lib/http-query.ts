import "server-only";
import { z } from "zod";
import { RequestError } from "@/lib/auth/errors";

/** Parses a request's query string with `schema`, 422 with the issues when it does not fit. */
export function readQuery<T extends z.ZodType>(req: Request, schema: T): z.infer<T> {
  const params = Object.fromEntries(new URL(req.url).searchParams);
  const parsed = schema.safeParse(params);
  if (!parsed.success) throw new RequestError(422, "Some query parameters are invalid.", z.flattenError(parsed.error));
  return parsed.data;
}
