// One error shape for users and API clients: a stable code, a plain-words message, an HTTP status.
// JSON form: {"error":{"code","message"}} (plus "fields" when the input was wrong field by field).

export interface AppErrorDetails {
  /** Extra response headers, e.g. Retry-After on a 429. */
  headers?: Record<string, string>;
  /** Messages per input field, for a form to show beside each field (and an API client to read). */
  fieldErrors?: Record<string, string[]>;
}

export class AppError extends Error {
  readonly headers: Record<string, string>;
  readonly fieldErrors?: Record<string, string[]>;
  constructor(
    readonly code: string,
    message: string,
    readonly status = 400,
    details: AppErrorDetails = {},
  ) {
    super(message);
    this.name = "AppError";
    this.headers = details.headers ?? {};
    this.fieldErrors = details.fieldErrors;
  }
}

export const notSignedIn = () => new AppError("not_signed_in", "Please sign in first.", 401);
export const forbidden = () => new AppError("forbidden", "Your role does not allow this.", 403);
export const notFound = (what: string) => new AppError("not_found", `${what} was not found.`, 404);

export const tooManyAttempts = (seconds: number) =>
  new AppError("too_many_attempts", `Too many failed attempts. Try again in ${Math.ceil(seconds / 60)} minute(s).`, 429, {
    headers: { "Retry-After": String(seconds) },
  });

/** Bad input, named field by field (422). */
export const invalidInput = (fieldErrors: Record<string, string[]>, message = "Please correct the marked fields.") =>
  new AppError("invalid_input", message, 422, { fieldErrors });

export interface ErrorBody {
  error: { code: string; message: string; fields?: Record<string, string[]> };
}

export function errorBody(error: unknown): { status: number; body: ErrorBody } {
  if (error instanceof AppError) {
    const fields = error.fieldErrors ? { fields: error.fieldErrors } : {};
    return { status: error.status, body: { error: { code: error.code, message: error.message, ...fields } } };
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
