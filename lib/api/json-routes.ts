// JSON bodies for the routes whose rules live in another module (lib/jobs, lib/customers, lib/review): the body is
// read here (415 / 413 / 400) and handed on whole; that module validates it with its own zod schema (422 with a
// message per field), so the API and the forms apply one set of rules.
import { z } from "zod";
import { readJson } from "./http";

const anyObject = z.record(z.string(), z.unknown(), { error: "The body must be a JSON object." });

export const readObject = (request: Request) => readJson(request, anyObject);
