// A print job as prepress types it in, its status changes, and how the job list is asked for. Shared by the
// pages' server actions and the public API.
import { z } from "zod";
import { JOB_STATUSES } from "../../db/schema";
import { optionalInt, pageSchema, requiredInt } from "../validation";

export type JobStatus = (typeof JOB_STATUSES)[number];

/**
 * prepress → on press → completed, and cancelled from either open state. Completed and cancelled are final:
 * a job printed again is a new job with its own number (common practice, no published source).
 */
export const STATUS_TRANSITIONS: Record<JobStatus, readonly JobStatus[]> = {
  prepress: ["on_press", "cancelled"],
  on_press: ["completed", "cancelled"],
  completed: [],
  cancelled: [],
};

export const STATUS_LABELS: Record<JobStatus, string> = {
  prepress: "In prepress",
  on_press: "On press",
  completed: "Completed",
  cancelled: "Cancelled",
};

/**
 * Folding carton board is usually up to about 0.6 mm thick (common practice, no published source); sheet-fed
 * presses take somewhat heavier board, so up to 1.2 mm is accepted and anything above 0.6 mm is pointed out.
 */
export const BOARD_THICKNESS_MM = { min: 0.05, usualMax: 0.6, max: 1.2 } as const;

const text = (label: string, max: number, required: boolean) => {
  const base = z.string({ error: `${label} is required.` }).trim().max(max, { error: `${label} must be at most ${max} characters.` });
  return required ? base.min(1, { error: `${label} is required.` }) : base.optional().default("");
};

const boardThicknessMm = z.preprocess(
  (v) => (v === "" || v === null ? undefined : typeof v === "string" ? v.trim().replace(",", ".") : v),
  z.coerce
    .number({ error: "Board thickness must be a number of millimetres, e.g. 0.45." })
    .min(BOARD_THICKNESS_MM.min, { error: `Board thickness must be at least ${BOARD_THICKNESS_MM.min} mm.` })
    .max(BOARD_THICKNESS_MM.max, { error: `Board thickness must be at most ${BOARD_THICKNESS_MM.max} mm (folding carton board is usually up to about ${BOARD_THICKNESS_MM.usualMax} mm).` })
    .optional(),
);

export const jobInput = z.object({
  jobNumber: z
    .string({ error: "Job number is required." })
    .trim()
    .min(1, { error: "Job number is required." })
    .max(32, { error: "Job number must be at most 32 characters." })
    .regex(/^[A-Za-z0-9][A-Za-z0-9._/-]*$/, { error: "Job number may hold letters, digits and . _ / - only, starting with a letter or digit." }),
  customerId: requiredInt("Customer", 1, Number.MAX_SAFE_INTEGER),
  title: text("Title", 200, true),
  stock: text("Stock", 200, false),
  boardThicknessMm,
  press: text("Press", 100, false),
  runLengthSheets: optionalInt("Run length", 1, 10_000_000),
  upsRows: requiredInt("Rows of ups", 1, 50),
  upsColumns: requiredInt("Columns of ups", 1, 50),
  // Not given: the plant's default profile is used for new inspections.
  toleranceProfileId: optionalInt("Tolerance profile", 1, Number.MAX_SAFE_INTEGER),
});
export type JobInput = z.infer<typeof jobInput>;

export const jobStatusInput = z.object({
  status: z.enum(JOB_STATUSES, { error: "Choose one of the job statuses." }),
});

export const JOB_SORTS = ["jobNumber", "title", "customer", "status", "updated"] as const;

export const jobListQuery = z.object({
  q: z.string().trim().max(100).optional().catch(undefined),
  status: z.enum(JOB_STATUSES).optional().catch(undefined),
  customerId: z.coerce.number().int().positive().optional().catch(undefined),
  sort: z.enum(JOB_SORTS).catch("updated").default("updated"),
  dir: z.enum(["asc", "desc"]).catch("desc").default("desc"),
  ...pageSchema,
});
export type JobListQuery = z.infer<typeof jobListQuery>;
