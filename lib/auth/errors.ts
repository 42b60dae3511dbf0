/** Thrown by the data-access layer; route handlers and actions turn it into 401/403. */
export class AuthError extends Error {
  constructor(
    readonly status: 401 | 403,
    message = status === 401 ? "Sign in first." : "Your role does not allow this.",
  ) {
    super(message);
    this.name = "AuthError";
  }
}

/** A request the caller can fix: 404, 409, 422, 429... */
export class RequestError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly details?: unknown,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.name = "RequestError";
  }
}
