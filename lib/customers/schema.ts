// What a customer (brand owner) is made of when prepress or an administrator types one in, and how the list of
// customers is asked for. Shared by the pages' server actions and the public API.
import { z } from "zod";
import { pageSchema } from "../validation";

export const MAX_CONTACT_EMAILS = 20;

/** One address or several, separated by commas, semicolons, spaces or new lines; or a JSON list. */
const contactEmails = z
  .preprocess(
    (value) => (typeof value === "string" ? value.split(/[\s,;]+/).filter(Boolean) : value ?? []),
    z.array(z.string().trim().toLowerCase().pipe(z.email({ error: (issue) => `“${String(issue.input)}” is not an e-mail address.` }))),
  )
  .transform((list) => [...new Set(list)])
  .refine((list) => list.length <= MAX_CONTACT_EMAILS, { error: `At most ${MAX_CONTACT_EMAILS} contact addresses.` });

export const customerInput = z.object({
  name: z
    .string({ error: "Name is required." })
    .trim()
    .min(1, { error: "Name is required." })
    .max(200, { error: "Name must be at most 200 characters." }),
  contactEmails,
});
export type CustomerInput = z.infer<typeof customerInput>;

export const CUSTOMER_SORTS = ["name", "jobs", "updated"] as const;

export const customerListQuery = z.object({
  q: z.string().trim().max(100).optional().catch(undefined),
  sort: z.enum(CUSTOMER_SORTS).catch("name").default("name"),
  dir: z.enum(["asc", "desc"]).catch("asc").default("asc"),
  ...pageSchema,
});
export type CustomerListQuery = z.infer<typeof customerListQuery>;
