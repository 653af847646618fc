// The press-run paths of the OpenAPI document (traceability, CSV and PDF reports), kept apart from openapi.ts.
import { z } from "zod";
import type { ZodOpenApiPathsObject } from "zod-openapi";
import { IdParam, ErrorBody } from "./schemas";
import { Run, RunQuery } from "./run-schemas";

const err = (description: string) => ({ description, content: { "application/json": { schema: ErrorBody } } });
const common = {
  "401": err("No valid session or API token"),
  "403": err("The caller's role does not allow this"),
  "404": err("Not found, or belongs to a customer the caller may not see"),
};
const jobParams = { path: z.object({ jobId: IdParam }), query: RunQuery };
const file = (type: string, description: string) => ({ description, content: { [type]: { schema: z.string().meta({ format: "binary" }) } } });

export const runPaths: ZodOpenApiPathsObject = {
  "/api/v1/jobs/{jobId}/run": {
    get: {
      summary: "Traceability of a press run: sheets by sheet number, sampling, spans to pull",
      requestParams: jobParams,
      responses: { "200": { description: "The run", content: { "application/json": { schema: Run } } }, "400": err("Bad query"), ...common },
    },
  },
  "/api/v1/jobs/{jobId}/run/sheets.csv": {
    get: {
      summary: "The run's traceability table as CSV (RFC 4180, UTF-8, header row)",
      requestParams: jobParams,
      responses: { "200": file("text/csv", "One row per sheet"), "400": err("Bad query"), ...common },
    },
  },
  "/api/v1/jobs/{jobId}/run/report.pdf": {
    get: {
      summary: "The run report (PDF): traceability table, spans to pull, run chart, signed sheets",
      requestParams: jobParams,
      responses: { "200": file("application/pdf", "The report"), "400": err("Bad query"), ...common },
    },
  },
  "/api/v1/inspections/{inspectionId}/report.pdf": {
    get: {
      summary: "The sheet report (PDF): files and hashes, alignment, findings with close-ups and decisions, signature",
      requestParams: { path: z.object({ inspectionId: IdParam }) },
      responses: { "200": file("application/pdf", "The report"), ...common },
    },
  },
};
