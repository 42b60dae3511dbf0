/**
 * What the upload panel says when the server refuses an upload: the server's own words (they name the problem),
 * led by what the status means for the person uploading. Shared by the page and its tests.
 */
export interface UploadRefusal {
  status: number;
  title: string;
  detail: string;
  /** Field-level problems the server listed, one per line. */
  issues: string[];
}

const TITLES: Record<number, string> = {
  400: "The upload was not complete",
  401: "You are signed out",
  403: "Your role may not upload revisions",
  404: "This program no longer exists",
  409: "The program changed meanwhile",
  413: "The file is too large",
  415: "This is not a text program",
  422: "The file was refused",
  429: "Too many requests",
};

function issueLines(issues: unknown): string[] {
  if (!issues || typeof issues !== "object") return [];
  const out: string[] = [];
  const { fieldErrors, formErrors } = issues as { fieldErrors?: Record<string, unknown>; formErrors?: unknown };
  if (Array.isArray(formErrors)) for (const m of formErrors) if (typeof m === "string") out.push(m);
  if (fieldErrors && typeof fieldErrors === "object") {
    for (const [field, list] of Object.entries(fieldErrors)) {
      if (Array.isArray(list)) for (const m of list) if (typeof m === "string") out.push(`${field}: ${m}`);
    }
  }
  return out;
}

/** Turns a refused upload's status and JSON body ({error, issues?}, or anything else) into words. */
export function describeUploadRefusal(status: number, body: unknown): UploadRefusal {
  const error = body && typeof body === "object" && typeof (body as { error?: unknown }).error === "string" ? (body as { error: string }).error : null;
  const title = TITLES[status] ?? (status >= 500 ? "The server could not store the upload" : `The server answered ${status}`);
  let detail = error ?? (status >= 500 ? "Nothing was stored. Try again; if it keeps failing, tell an admin." : "Nothing was stored.");
  if (status === 401) detail = "Sign in again, then drop the file once more. Nothing was stored.";
  return { status, title, detail, issues: issueLines((body as { issues?: unknown } | null)?.issues) };
}

/** The connection failed before the server answered (dropped network, server gone). */
export function connectionRefusal(): UploadRefusal {
  return {
    status: 0,
    title: "The connection dropped",
    detail: "The upload did not reach the server whole, so nothing was stored. Check the network and try again.",
    issues: [],
  };
}
