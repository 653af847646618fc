// Words the reports print for stored codes.
export const KIND_WORDS = {
  extra_ink: "Extra ink",
  missing_ink: "Missing ink",
  colour_shift: "Colour shift",
  changed_text: "Changed text or linework",
  streak: "Streak or scratch",
} as const;
export const DECISION_WORDS = { pending: "Not decided", accepted: "Accepted", rejected: "Rejected" } as const;
export const REASON_WORDS = { no_defect: "no defect", within_tolerance: "within tolerance", defect: "defect" } as const;
export const RECURRENCE_WORDS = { isolated: "isolated", repeating: "repeating", every_up: "in every up" } as const;
export const VERDICT_WORDS = { pending: "not signed off yet", passed: "PASSED", failed: "FAILED" } as const;
