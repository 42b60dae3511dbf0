import "server-only";
import { z } from "zod";
import { AuthError, RequestError } from "@/lib/auth/errors";
import { positiveId } from "@/lib/validation";

import type { FormState } from "@/lib/form-state";

export type { FormState };

const SECRET_FIELDS = /password/i;

/** The non-secret text fields of a form, to hand back on error. */
export function echoValues(fd: FormData): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of fd.entries()) {
    if (typeof v === "string" && !SECRET_FIELDS.test(k) && !k.startsWith("$ACTION")) out[k] = v;
  }
  return out;
}

/** Runs an action body, mapping the DAL's errors and zod's to a FormState. */
export async function runAction(fd: FormData, body: () => Promise<FormState>): Promise<FormState> {
  try {
    return await body();
  } catch (e) {
    const values = echoValues(fd);
    if (e instanceof AuthError) return { status: e.status, message: e.message };
    if (e instanceof RequestError) {
      const fieldErrors = (e.details as { fieldErrors?: Record<string, string[]> } | undefined)?.fieldErrors ??
        (e.details && typeof e.details === "object" ? (e.details as Record<string, string[]>) : undefined);
      return { status: e.status, message: e.message, fieldErrors, values };
    }
    if (e instanceof z.ZodError) {
      const flat = z.flattenError(e);
      return {
        status: 422,
        message: flat.formErrors[0] ?? "Some fields need attention.",
        fieldErrors: flat.fieldErrors as Record<string, string[]>,
        values,
      };
    }
    console.error("unhandled error in server action:", e);
    return { status: 500, message: "Something went wrong on the server. Nothing was saved.", values };
  }
}

/** Parses FormData-derived input, throwing a ZodError that runAction turns into field errors. */
export function parseForm<T extends z.ZodType>(schema: T, input: unknown): z.infer<T> {
  return schema.parse(input);
}

/**
 * The id a page bound to an action (`action.bind(null, row.id)`), checked at the edge: the client
 * sends bound arguments and can send anything, so take the parameter as `unknown` and call this
 * first thing inside runAction, after authorize. Anything but a JavaScript number that is a whole
 * number from 1 to 2^31-1 (a string "7" included) is a 400; DAL guards that compare ids then hold.
 */
export function actionId(raw: unknown): number {
  const id = positiveId(raw);
  if (id === null) throw new RequestError(400, "That record reference is not valid. Reload the page and try again.");
  return id;
}

/** A text field of a form, or undefined when it is missing or a file. */
export function formString(fd: FormData, name: string): string | undefined {
  const v = fd.get(name);
  return typeof v === "string" ? v : undefined;
}
