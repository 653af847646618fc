// Tolerance profiles. The colour figures they rest on are ISO 12647-2 tolerances quoted from memory (see
// lib/imaging/profiles.ts); these tests check the shape and the errors, not the standard.
import { describe, expect, it } from "vitest";
import { getProfile, listProfiles, validateProfile } from "@/lib/imaging/profiles";
import { ImagingError } from "@/lib/imaging/types";

describe("tolerance profiles", () => {
  it("ships strict, standard and relaxed profiles, strictest first", () => {
    const names = listProfiles().map((p) => p.name);
    expect(names).toEqual(["strict-pharma", "standard-food", "relaxed-board"]);
    const [pharma, food, board] = listProfiles();
    expect(pharma.minDefectMm).toBeLessThan(food.minDefectMm);
    expect(food.minDefectMm).toBeLessThan(board.minDefectMm);
    expect(pharma.deltaE00Threshold).toBeLessThan(board.deltaE00Threshold);
  });

  it("keeps every colour threshold at or below ISO 12647-2's solid tolerance of ΔE 5 (from memory)", () => {
    for (const p of listProfiles().slice(0, 2)) expect(p.deltaE00Threshold).toBeLessThanOrEqual(5);
  });

  it("finds a profile by name and returns a copy", () => {
    const a = getProfile("standard-food");
    a.excludedAreasMm.push({ x: 0, y: 0, w: 1, h: 1 });
    expect(getProfile("standard-food").excludedAreasMm).toEqual([]);
  });

  it("names the known profiles when the name is unknown", () => {
    expect(() => getProfile("gold")).toThrow(ImagingError);
    try {
      getProfile("gold");
    } catch (e) {
      expect((e as ImagingError).code).toBe("unknown_profile");
      expect((e as Error).message).toContain("strict-pharma");
    }
  });

  it("refuses a profile with a bad field", () => {
    const ok = getProfile("strict-pharma");
    expect(validateProfile(ok)).toBe(ok);
    expect(() => validateProfile({ ...ok, minDefectMm: 0 })).toThrow(/minDefectMm/);
    expect(() => validateProfile({ ...ok, deltaE00Threshold: Number.NaN })).toThrow(/deltaE00Threshold/);
    expect(() => validateProfile({ ...ok, excludedAreasMm: [{ x: 0, y: 0, w: -1, h: 1 }] })).toThrow(/excluded/);
  });
});
