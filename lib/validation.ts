// Input checking shared by server actions, route handlers and the public API: one zod schema per input, parsed
// here so every caller gets the same 422 with a message per field.
import { z } from "zod";
import { invalidInput } from "./errors";

export function parseInput<S extends z.ZodType>(schema: S, input: unknown): z.infer<S> {
  const parsed = schema.safeParse(input);
  if (parsed.success) return parsed.data;
  const fieldErrors: Record<string, string[]> = {};
  for (const issue of parsed.error.issues) {
    const key = issue.path.length > 0 ? issue.path.map(String).join(".") : "form";
    (fieldErrors[key] ??= []).push(issue.message);
  }
  throw invalidInput(fieldErrors);
}

/** Forms send "" for an empty field; JSON may send null. Both mean "not given". */
const blankToUndefined = (value: unknown) => (value === "" || value === null ? undefined : typeof value === "string" ? value.trim() : value);

/** A whole number within [min, max], from a form string or a JSON number; "" and null mean not given. */
export const optionalInt = (label: string, min: number, max: number) =>
  z.preprocess(
    blankToUndefined,
    z.coerce
      .number({ error: `${label} must be a number.` })
      .int({ error: `${label} must be a whole number.` })
      .min(min, { error: `${label} must be at least ${min.toLocaleString("en-GB")}.` })
      .max(max, { error: `${label} must be at most ${max.toLocaleString("en-GB")}.` })
      .optional(),
  );

export const requiredInt = (label: string, min: number, max: number) =>
  z.preprocess(
    blankToUndefined,
    z.coerce
      .number({ error: `${label} is required.` })
      .int({ error: `${label} must be a whole number.` })
      .min(min, { error: `${label} must be at least ${min.toLocaleString("en-GB")}.` })
      .max(max, { error: `${label} must be at most ${max.toLocaleString("en-GB")}.` }),
  );

/** A list page's place: 1-based page, rows per page (bounded, so nobody asks the server for a million rows). */
export const pageSchema = {
  page: z.preprocess(blankToUndefined, z.coerce.number().int().min(1).max(100_000).catch(1).default(1)),
  pageSize: z.preprocess(blankToUndefined, z.coerce.number().int().min(5).max(100).catch(25).default(25)),
};

export interface Page<T> {
  rows: T[];
  total: number;
  page: number;
  pageSize: number;
}

/** MariaDB's duplicate-key error (1062), whether Drizzle wraps it or not. */
export function isDuplicateKey(error: unknown): boolean {
  for (let e = error as { code?: string; errno?: number; cause?: unknown } | undefined; e; e = e.cause as typeof e) {
    if (e.code === "ER_DUP_ENTRY" || e.errno === 1062) return true;
  }
  return false;
}
