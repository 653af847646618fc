// Words the review screens use for stored codes.
import type { SheetFinding } from "@/lib/review/sheet";

export const KIND_LABELS: Record<SheetFinding["kind"], string> = {
  extra_ink: "Extra ink",
  missing_ink: "Missing ink",
  colour_shift: "Colour shift",
  changed_text: "Changed text or linework",
  streak: "Streak or scratch",
};

export const DECISION_LABELS: Record<SheetFinding["decision"], string> = {
  pending: "Not decided",
  accepted: "Accepted",
  rejected: "Rejected",
};

export const REASON_LABELS = { no_defect: "No defect", within_tolerance: "Within tolerance", defect: "Defect" } as const;

export const MEANING_LABELS = { reviewed: "Reviewed", approved_for_release: "Approved for release", rejected: "Rejected" } as const;
