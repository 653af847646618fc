// The plumbing every /api/v1 route handler shares: one error shape, JSON bodies and query strings read through
// zod, cursor pages. Messages name what was wrong with the input, never echo it back whole, and never carry a
// stack trace, SQL or a file path (anything unexpected becomes the generic 500 of lib/errors.ts).
import type { z } from "zod";
import { AppError, errorResponse } from "@/lib/errors";

/** Largest JSON body accepted; every body of this API is a few hundred bytes. */
export const MAX_JSON_BYTES = 64 * 1024;

export type RouteContext<P> = { params: Promise<P> };

/** Wraps a route handler: whatever it throws becomes `{"error":{"code","message"}}` with the right status. */
export function route<P>(run: (request: Request, params: P) => Promise<Response>) {
  return async (request: Request, ctx: RouteContext<P>): Promise<Response> => {
    try {
      return await run(request, await ctx.params);
    } catch (error) {
      return errorResponse(error);
    }
  };
}

export function json(data: unknown, status = 200): Response {
  return Response.json(data, { status, headers: { "Cache-Control": "no-store" } });
}

function describeIssues(issues: z.core.$ZodIssue[]): string {
  return issues
    .slice(0, 5)
    .map((issue) => (issue.path.length ? `${issue.path.join(".")}: ${issue.message}` : issue.message))
    .join("; ");
}

/** Reads a JSON body: 415 when it is not JSON, 413 when too large, 400 when malformed, 422 when invalid. */
export async function readJson<S extends z.ZodType>(request: Request, schema: S): Promise<z.infer<S>> {
  const type = (request.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (type !== "application/json") {
    throw new AppError("unsupported_media_type", "Send the body as JSON with Content-Type: application/json.", 415);
  }
  const declared = Number(request.headers.get("content-length") ?? 0);
  if (declared > MAX_JSON_BYTES) throw new AppError("body_too_large", `The JSON body is larger than ${MAX_JSON_BYTES} bytes.`, 413);
  const text = await request.text().catch(() => {
    throw new AppError("upload_interrupted", "The request body could not be read.", 400);
  });
  if (Buffer.byteLength(text) > MAX_JSON_BYTES) throw new AppError("body_too_large", `The JSON body is larger than ${MAX_JSON_BYTES} bytes.`, 413);
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new AppError("malformed_json", "The body is not valid JSON.", 400);
  }
  const parsed = schema.safeParse(value);
  if (!parsed.success) throw new AppError("invalid_input", `The input is not valid: ${describeIssues(parsed.error.issues)}.`, 422);
  return parsed.data;
}

/** Reads the query string; an unknown or malformed parameter is a 400. */
export function readQuery<S extends z.ZodType>(request: Request, schema: S): z.infer<S> {
  const params = Object.fromEntries(new URL(request.url).searchParams);
  const parsed = schema.safeParse(params);
  if (!parsed.success) throw new AppError("invalid_query", `The query is not valid: ${describeIssues(parsed.error.issues)}.`, 400);
  return parsed.data;
}

type Key = [number | string, number];

function compareDesc(a: Key, b: Key): number {
  if (a[0] !== b[0]) return a[0] < b[0] ? 1 : -1;
  return b[1] - a[1];
}

function decodeCursor(cursor: string): Key {
  try {
    const key = JSON.parse(Buffer.from(cursor, "base64url").toString("utf8")) as unknown;
    if (Array.isArray(key) && key.length === 2 && ["number", "string"].includes(typeof key[0]) && Number.isSafeInteger(key[1])) return key as Key;
  } catch {
    // Falls through to the error below.
  }
  throw new AppError("bad_cursor", "The cursor is not one this API gave out; start again without it.", 400);
}

/**
 * A page of `items` in descending order of `key` (a sort value and the id that breaks ties), starting after
 * `cursor`. The cursor holds the last item's key, so rows added or removed meanwhile do not shift the pages.
 */
export function page<T>(items: T[], key: (item: T) => Key, limit: number, cursor?: string): { items: T[]; nextCursor: string | null } {
  const sorted = [...items].sort((a, b) => compareDesc(key(a), key(b)));
  const after = cursor ? decodeCursor(cursor) : null;
  const rest = after ? sorted.filter((item) => compareDesc(key(item), after) > 0) : sorted;
  const slice = rest.slice(0, limit);
  const nextCursor = rest.length > limit ? Buffer.from(JSON.stringify(key(slice.at(-1)!))).toString("base64url") : null;
  return { items: slice, nextCursor };
}
