// Named tolerance profiles: how small a mark must be found, how large a colour difference counts, and how much
// residual misregistration along edges is forgiven.
//
// Where the defaults come from:
// - Colour: ISO 12647-2 (offset process-colour printing) gives tolerances for solids of the process colours.
//   From memory (check the standard before quoting): the 2004 edition (with Amd 1:2007) allows ΔE*ab 5 between
//   the OK print and the reference for C, M, Y, K solids and a production variation of ΔE*ab 4 (C, M, K) and
//   5 (Y); the 2013 edition restated these in ΔE00 (roughly 3–5 depending on colour). A scan from a flatbed is
//   not a calibrated measurement, so the thresholds below sit at or below those figures, tighter for medicines.
//   A spectrophotometer decides on colour; these figures only decide what a reviewer is shown.
// - Smallest defect: a 0.2–0.3 mm speck on a medicine carton is expected to be caught, 0.5 mm on general board
//   work (common practice, no published source). A felt-tip mark of ~0.3 mm on one sheet must be found.
// - Registration: a sheet-fed offset press holds plate-to-plate register to about ±0.1 mm; the scan's own
//   alignment residual adds a fraction of a pixel (common practice, no published source; from memory).
import { ImagingError, type ToleranceProfile } from "./types";

const PROFILES: readonly ToleranceProfile[] = [
  {
    name: "strict-pharma",
    label: "Medicines and medical devices",
    minDefectMm: 0.2,
    deltaE00Threshold: 3,
    registrationToleranceMm: 0.1,
    excludedAreasMm: [],
  },
  {
    name: "standard-food",
    label: "Food and general consumer packaging",
    minDefectMm: 0.3,
    deltaE00Threshold: 4,
    registrationToleranceMm: 0.15,
    excludedAreasMm: [],
  },
  {
    name: "relaxed-board",
    label: "Transit and display board",
    minDefectMm: 0.5,
    deltaE00Threshold: 6,
    registrationToleranceMm: 0.25,
    excludedAreasMm: [],
  },
];

/** Every shipped profile, in order from strictest to most relaxed; copies, safe to modify. */
export function listProfiles(): ToleranceProfile[] {
  return PROFILES.map(copyProfile);
}

/** The named profile (a copy); a clear error naming the known profiles for an unknown name. */
export function getProfile(name: string): ToleranceProfile {
  const found = PROFILES.find((p) => p.name === name);
  if (!found) {
    const known = PROFILES.map((p) => p.name).join(", ");
    throw new ImagingError("unknown_profile", `There is no tolerance profile named "${name}". Known profiles: ${known}.`);
  }
  return copyProfile(found);
}

/** Checks a caller-built profile; throws ImagingError naming the first bad field. */
export function validateProfile(profile: ToleranceProfile): ToleranceProfile {
  const positive = (field: keyof ToleranceProfile, value: unknown, max: number) => {
    if (typeof value !== "number" || !Number.isFinite(value) || value <= 0 || value > max) {
      throw new ImagingError("bad_profile", `Tolerance profile field ${field} must be a number above 0 and at most ${max}.`);
    }
  };
  positive("minDefectMm", profile.minDefectMm, 50);
  positive("deltaE00Threshold", profile.deltaE00Threshold, 100);
  positive("registrationToleranceMm", profile.registrationToleranceMm, 5);
  if (!Array.isArray(profile.excludedAreasMm)) {
    throw new ImagingError("bad_profile", "Tolerance profile field excludedAreasMm must be a list of rectangles in mm.");
  }
  for (const r of profile.excludedAreasMm) {
    if (![r?.x, r?.y, r?.w, r?.h].every((v) => typeof v === "number" && Number.isFinite(v)) || r.w < 0 || r.h < 0) {
      throw new ImagingError("bad_profile", "Each excluded area needs finite x, y, w, h in mm with w and h not negative.");
    }
  }
  return profile;
}

function copyProfile(p: ToleranceProfile): ToleranceProfile {
  return { ...p, excludedAreasMm: p.excludedAreasMm.map((r) => ({ ...r })) };
}
