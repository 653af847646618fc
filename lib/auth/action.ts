import "server-only";
// One wrapper for every server action: parse the form with zod, load the actor, ask the policy, then run.
// Treat each action as a public POST endpoint: the policy check lives here, not in the page that shows the form.
import type { z } from "zod";
import { AppError } from "../errors";
import { authorize, type Action, type Actor, type Resource } from "./policy";
import { actorOrThrow } from "./session";

export interface ActionState {
  ok?: string;
  /** A secret shown once after it was made (a new API token); never echoed again. */
  secret?: string;
  error?: string;
  /** The refusal's stable code (AppError.code), e.g. "forbidden" or "not_found". */
  code?: string;
  fieldErrors?: Record<string, string[] | undefined>;
  /** The submitted values, echoed back so a refused form keeps what was typed. */
  values?: Record<string, string>;
}

interface Options<S extends z.ZodType> {
  schema: S;
  action: Action;
  /** The job-scoped resource the action touches, when the policy needs to know its customer. */
  resource?: (data: z.infer<S>) => Promise<Resource | undefined>;
}

function echo(formData: FormData): Record<string, string> {
  const values: Record<string, string> = {};
  for (const [key, value] of formData) {
    if (typeof value === "string" && !/password|token/i.test(key)) values[key] = value;
  }
  return values;
}

export function protectedAction<S extends z.ZodType>(
  options: Options<S>,
  run: (data: z.infer<S>, actor: Actor) => Promise<ActionState | void>,
) {
  return async (_previous: ActionState, formData: FormData): Promise<ActionState> => {
    try {
      const actor = await actorOrThrow();
      // Refuse early when the role can never do this; a job-scoped check follows once the input names the job.
      if (!options.resource) authorize(actor, options.action);
      const parsed = options.schema.safeParse(Object.fromEntries(formData));
      if (!parsed.success) {
        const fieldErrors: Record<string, string[]> = {};
        for (const issue of parsed.error.issues) {
          const key = String(issue.path[0] ?? "form");
          (fieldErrors[key] ??= []).push(issue.message);
        }
        return { error: "Please correct the marked fields.", fieldErrors, values: echo(formData) };
      }
      if (options.resource) authorize(actor, options.action, await options.resource(parsed.data));
      return (await run(parsed.data, actor)) ?? {};
    } catch (error) {
      if (error instanceof AppError) return { error: error.message, code: error.code, fieldErrors: error.fieldErrors, values: echo(formData) };
      throw error;
    }
  };
}
