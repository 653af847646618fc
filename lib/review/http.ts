// Error responses of the review routes: a stale decision also says, as data, who decided first and when, so the
// page can show the time in the reader's own time zone.
import { errorResponse } from "@/lib/errors";
import { StaleDecisionError } from "./decisions";

export function reviewErrorResponse(error: unknown): Response {
  if (error instanceof StaleDecisionError) {
    return Response.json(
      {
        error: { code: error.code, message: error.message },
        conflict: { decidedBy: error.decidedBy, decidedAt: error.decidedAt, version: error.currentVersion },
      },
      { status: 409 },
    );
  }
  return errorResponse(error);
}
