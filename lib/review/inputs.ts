// The request bodies of decisions and sign-off, shared by the workspace's routes and the public API.
import { z } from "zod";
import { SIGNATURE_MEANINGS } from "@/db/schema";
import { AppError } from "@/lib/errors";

const version = z.number({ error: "Send the version of the finding you saw." }).int().min(0);

export const decideBody = z.object({
  decision: z.enum(["accepted", "rejected"], { error: "Choose accept or reject." }),
  reason: z.enum(["no_defect", "within_tolerance", "defect"], { error: "Choose a reason." }),
  comment: z.string().max(2000).nullish(),
  version,
  /** The reviewer confirmed run memory's suggestion ("accepted on sheet N"); kept in the audit trail. */
  confirmsPrior: z.boolean().optional(),
});

export const undoBody = z.object({ version });

export const signBody = z.object({
  verdict: z.enum(["passed", "failed"], { error: "Choose passed or failed." }),
  meaning: z.enum(SIGNATURE_MEANINGS, { error: "Choose what your signature means." }),
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(1000),
});

export const reopenBody = z.object({ reason: z.string({ error: "Give a reason." }).max(2000) });

/** The JSON body of a request, checked against `schema`; a bad body is a 422 with the first problem in words. */
export async function readBody<T>(request: Request, schema: z.ZodType<T>): Promise<T> {
  let raw: unknown;
  try {
    raw = await request.json();
  } catch {
    throw new AppError("bad_json", "The request body must be JSON.", 400);
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) throw new AppError("invalid_input", parsed.error.issues[0]?.message ?? "The request is not valid.", 422);
  return parsed.data;
}
