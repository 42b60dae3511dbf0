import { z } from "zod";

export type SearchParams = Record<string, string | string[] | undefined>;

/** The first value of each search parameter. */
export function flattenSearch(sp: SearchParams): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(sp)) {
    const first = Array.isArray(v) ? v[0] : v;
    if (first !== undefined) out[k] = first;
  }
  return out;
}

/**
 * Parses a page's search parameters with `schema`, dropping the ones it refuses (so one bad filter in a shared link
 * does not empty the page) and naming them, for the page to say what it ignored.
 */
export function parseSearch<T extends z.ZodObject>(schema: T, sp: SearchParams): { query: z.infer<T>; ignored: string[] } {
  const flat = flattenSearch(sp);
  const first = schema.safeParse(flat);
  if (first.success) return { query: first.data, ignored: [] };
  const bad = new Set(first.error.issues.map((i) => String(i.path[0] ?? "")));
  const kept = Object.fromEntries(Object.entries(flat).filter(([k]) => !bad.has(k)));
  const second = schema.safeParse(kept);
  return { query: second.success ? second.data : schema.parse({}), ignored: [...bad].filter(Boolean) };
}
