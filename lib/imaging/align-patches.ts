import type { Affine } from "./align-affine";
import type { OpenCv } from "./opencv";
import type { DisplacementField, RgbaImage } from "./types";
export type { DisplacementField };
export function refineOnPatches(cv: OpenCv, artwork: RgbaImage & { dpi: number }, scan: RgbaImage & { dpi: number }, map: Affine, opts: { localField: boolean }) {
  void cv; void artwork; void scan; void opts;
  return { map, residualPx: 0, field: undefined as DisplacementField | undefined };
}
