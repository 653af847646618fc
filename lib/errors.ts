// One error shape for users and API clients: a stable code, a plain-words message, an HTTP status.
// JSON form: {"error":{"code","message"}}.

export class AppError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly status = 400,
    /** Extra response headers, e.g. Retry-After on a 429. */
    readonly headers: Record<string, string> = {},
  ) {
    super(message);
    this.name = "AppError";
  }
}

export const notSignedIn = () => new AppError("not_signed_in", "Please sign in first.", 401);
export const forbidden = () => new AppError("forbidden", "Your role does not allow this.", 403);
export const notFound = (what: string) => new AppError("not_found", `${what} was not found.`, 404);

export const tooManyAttempts = (seconds: number) =>
  new AppError("too_many_attempts", `Too many failed attempts. Try again in ${Math.ceil(seconds / 60)} minute(s).`, 429, {
    "Retry-After": String(seconds),
  });

export function errorBody(error: unknown): { status: number; body: { error: { code: string; message: string } } } {
  if (error instanceof AppError) {
    return { status: error.status, body: { error: { code: error.code, message: error.message } } };
  }
  return {
    status: 500,
    body: { error: { code: "internal", message: "Something went wrong on our side. Nothing was saved; please try again." } },
  };
}

/** Route-handler helper: turn any thrown error into the JSON error response. */
export function errorResponse(error: unknown): Response {
  const { status, body } = errorBody(error);
  if (status === 500) console.error(error);
  const headers = { "Cache-Control": "no-store", ...(error instanceof AppError ? error.headers : {}) };
  return Response.json(body, { status, headers });
}
