// COARSE placement of the sheet: which way round it lies on the glass, its angle to within a degree or so and
// where it is, by whole-page correlation on small grey levels (about 4 000 pixels each): a sweep of the four
// quarter turns × −6° … +6° in 3° steps on a level twice coarser still, then the best quarter turn (and any
// close second) placed again on the 4 000-pixel level by a walk in 1° steps and a parabola (see
// coarsePlacement).
//
// Why whole-page correlation rather than feature matching: a press sheet carries many identical ups, and the
// ratio test of descriptor matching throws the repeated features away — ORB locked one row of ups off on a
// 15-up sheet. The page as a whole (margins, colour bar, sheet edge, the imposition itself) has one best
// overlap. OpenCV's matchTemplate (TM_CCOEFF_NORMED, zero-mean normalised, so the scanner's tone and the lid
// colour do not matter) does each candidate in about a millisecond at this size.
//
// Two ways round, chosen per candidate by size: when the whole sheet fits on the scan (sheet smaller than the
// glass, background around it) the rotated artwork is looked for in the scan; when the scan sees only part
// of the sheet (a press sheet larger than the flatbed) the scan, turned back, is looked for in the artwork,
// which is padded with the lid's colour so that the scan window may also run past the sheet's edge.
import { apply, invert, rotation, translate, type Affine } from "./affine";
import { withMats, type OpenCv } from "./opencv";
import type { GreyLevel } from "./pyramid";

export interface CoarseResult {
  /** Artwork level → scan level. */
  map: Affine;
  /** Turn of the sheet in degrees (quarter turn + angle), clockwise on screen. */
  angleDeg: number;
  score: number;
  /** Best score of another placement (another local maximum away from the peak) at the same angle. */
  runnerUp: number;
  /** Other placements at the same angle (local maxima away from the peak) scoring within ALTERNATIVE_GAP of it, best first. */
  alternatives: { map: Affine; score: number }[];
  /** The best placement of each other quarter turn placed on the finer level, best first. */
  otherTurns: { map: Affine; score: number }[];
}

/** Other local maxima kept as alternative placements when they score within this of the best (at most MAX_ALTERNATIVES). */
const ALTERNATIVE_GAP = 0.1;
const MAX_ALTERNATIVES = 6;

/** Angles of the sweep, on the level twice coarser, about each quarter turn. */
const SWEEP = [-6, -3, 0, 3, 6];
const QUARTERS = [0, 90, 180, 270];
/** Quarter turns whose sweep score comes within this of the best are placed again on the finer level. */
const SHORTLIST_GAP = 0.2;

/**
 * `ratio`: scan level pixels per artwork level pixel at nominal size (the resolutions' ratio). `sweep`: the
 * same two images at twice the block size, where the rotation sweep runs.
 *
 * Why two levels: one candidate costs about its level's pixel count (warp and matchTemplate), and most of the
 * sweep only has to tell the quarter turns apart and bracket the angle. On the twice coarser level a 3° step
 * moves the page's corners no more than a 1.5° step does on the finer one, so 4 × 5 candidates there cost about
 * what 5 cost here; the finer level then only places the best quarter turn (and any close second) at its
 * estimated angle and 1° either side, and once more at the parabola's vertex. The score, runner-up and map
 * returned all come from the finer level.
 */
export function coarsePlacement(cv: OpenCv, art: GreyLevel, scan: GreyLevel, ratio: number, sweep: { art: GreyLevel; scan: GreyLevel }): CoarseResult {
  const quarters = withMats((keep) => {
    const s = placer(cv, keep, sweep.art, sweep.scan, ratio * (sweep.art.k / art.k) / (sweep.scan.k / scan.k));
    const found = QUARTERS.map((q) => {
      const scores = SWEEP.map((a) => s(q + a).score);
      let i = 0;
      for (let j = 1; j < scores.length; j++) if (scores[j] > scores[i]) i = j;
      const off = i > 0 && i < scores.length - 1 ? peak(scores[i - 1], scores[i], scores[i + 1]) : 0;
      return { angle: q + SWEEP[i] + off * (SWEEP[1] - SWEEP[0]), score: scores[i] };
    });
    const top = Math.max(...found.map((f) => f.score));
    return found.filter((f) => f.score >= top - SHORTLIST_GAP).sort((a, b) => b.score - a.score);
  });
  return withMats((keep) => {
    const place = placer(cv, keep, art, scan, ratio);
    let best: CoarseResult | null = null;
    const picks: CoarseResult[] = [];
    for (const { angle } of quarters) {
      // The sweep's estimate can be a degree or more out (a 3° step over a narrow peak): step on from it until
      // the best angle has a lower one either side, then refine with a parabola through the three and place
      // once more at its vertex.
      const at = new Map<number, CoarseResult>();
      const get = (i: number) => at.get(i) ?? at.set(i, place(angle + i * STEP)).get(i)!;
      // A close second from the sweep that places far below the best here cannot win: no walk for it.
      if (best && get(0).score < best.score - HOPELESS) continue;
      let i = 0;
      for (let steps = 0; steps < MAX_STEPS; steps++) {
        const dir = get(i + 1).score > get(i).score ? 1 : get(i - 1).score > get(i).score ? -1 : 0;
        if (dir === 0) break;
        i += dir;
      }
      let pick = get(i);
      const off = peak(get(i - 1).score, pick.score, get(i + 1).score);
      if (off !== 0) {
        const refined = place(angle + (i + off) * STEP);
        if (refined.score >= pick.score - 0.02) pick = refined;
      }
      picks.push(pick);
      if (!best || pick.score > best.score) best = pick;
    }
    const otherTurns = picks.filter((p) => p !== best).sort((a, b) => b.score - a.score).map((p) => ({ map: p.map, score: p.score }));
    return { ...best!, otherTurns };
  });
}

/** Angle step of the placement on the finer level (degrees), and how far it may walk from the sweep's estimate. */
const STEP = 1;
const MAX_STEPS = 3;
/**
 * Score below the best placement at which another quarter turn is not walked: a degree off the peak costs the
 * right turn about 0.1 (measured on the test sheets), so 0.3 below is another turn, not a misjudged angle.
 */
const HOPELESS = 0.3;

function placer(cv: OpenCv, keep: <M extends { delete(): void }>(m: M) => M, art: GreyLevel, scan: GreyLevel, ratio: number) {
  const artMat = keep(cv.matFromArray(art.height, art.width, cv.CV_32F, art.data));
  const scanMat = keep(cv.matFromArray(scan.height, scan.width, cv.CV_32F, scan.data));
  // Whatever lies outside the sheet is lid: fill and pad with the scan's border colour, so that at the right
  // placement the lid in the scan meets lid-coloured padding (a dark lid then marks the sheet edge instead
  // of fighting the correlation).
  const lid = borderMean(scan);
  return (deg: number) => candidate(cv, keep, artMat, scanMat, art, scan, lid, deg, ratio);
}

function candidate(
  cv: OpenCv,
  keep: <M extends { delete(): void }>(m: M) => M,
  artMat: unknown,
  scanMat: unknown,
  art: GreyLevel,
  scan: GreyLevel,
  lid: number,
  deg: number,
  ratio: number,
): CoarseResult {
  const turn = rotation(deg, ratio);
  const box = bounds(turn, art.width, art.height);
  const sheetFits = box.w <= scan.width * 1.06 && box.h <= scan.height * 1.06;
  if (sheetFits) {
    // Rotated artwork sought in the scan (padded a little so a sheet as large as the glass still has play).
    const m = translate(turn, -box.x, -box.y);
    const tw = Math.ceil(box.w), th = Math.ceil(box.h);
    const templ = keep(warp(cv, artMat, m, tw, th, lid));
    const px = Math.max(0, tw - scan.width) + Math.ceil(0.05 * tw) + 2;
    const py = Math.max(0, th - scan.height) + Math.ceil(0.05 * th) + 2;
    const { x, y, score, runnerUp, others } = match(cv, keep, scanMat, templ, px, py);
    const alternatives = others.map((o) => ({ map: translate(m, o.x - px, o.y - py), score: o.score }));
    return { map: translate(m, x - px, y - py), angleDeg: deg, score, runnerUp, alternatives, otherTurns: [] };
  }
  // Scan, turned back, sought in the artwork padded with lid colour on every side.
  const back = invert(turn);
  const sbox = bounds(back, scan.width, scan.height);
  const n = translate(back, -sbox.x, -sbox.y);
  const tw = Math.ceil(sbox.w), th = Math.ceil(sbox.h);
  const templ = keep(warp(cv, scanMat, n, tw, th, lid));
  const px = Math.max(0, tw - art.width) + Math.ceil(0.3 * tw) + 2;
  const py = Math.max(0, th - art.height) + Math.ceil(0.3 * th) + 2;
  const { x, y, score, runnerUp, others } = match(cv, keep, artMat, templ, px, py, lid);
  const alternatives = others.map((o) => ({ map: invert(translate(n, o.x - px, o.y - py)), score: o.score }));
  return { map: invert(translate(n, x - px, y - py)), angleDeg: deg, score, runnerUp, alternatives, otherTurns: [] };
}

function warp(cv: OpenCv, src: unknown, m: Affine, w: number, h: number, fill: number) {
  const out = new cv.Mat();
  const M = cv.matFromArray(2, 3, cv.CV_64F, m);
  try {
    cv.warpAffine(src, out, M, new cv.Size(w, h), cv.INTER_LINEAR, cv.BORDER_CONSTANT, new cv.Scalar(fill));
  } finally {
    M.delete();
  }
  return out;
}

/** Best position of `templ` in `image` padded by (px, py), with a parabolic sub-pixel peak. */
function match(
  cv: OpenCv,
  keep: <M extends { delete(): void }>(m: M) => M,
  image: unknown,
  templ: { rows: number; cols: number },
  px: number,
  py: number,
  fill?: number,
) {
  const padded = keep(new cv.Mat());
  if (fill === undefined) cv.copyMakeBorder(image, padded, py, py, px, px, cv.BORDER_REPLICATE);
  else cv.copyMakeBorder(image, padded, py, py, px, px, cv.BORDER_CONSTANT, new cv.Scalar(fill));
  const res = keep(new cv.Mat());
  cv.matchTemplate(padded, templ, res, cv.TM_CCOEFF_NORMED);
  const r = res.data32F as Float32Array, w = res.cols as number, h = res.rows as number;
  let bi = 0;
  for (let i = 1; i < r.length; i++) if (r[i] > r[bi] || !Number.isFinite(r[bi])) bi = i;
  const bx = bi % w, by = (bi - bx) / w;
  const at = (x: number, y: number) => r[Math.min(h - 1, Math.max(0, y)) * w + Math.min(w - 1, Math.max(0, x))];
  // The best other local maximum away from the peak: as high as the peak means the scan fits two places
  // equally well (a window onto identical ups with no sheet edge or margin in it).
  const radius = Math.max(4, Math.round(0.06 * Math.min(templ.rows, templ.cols)));
  let runnerUp = -1;
  let others: { x: number; y: number; score: number }[] = [];
  for (let y = 1; y < h - 1; y++) {
    for (let x = 1; x < w - 1; x++) {
      const v = r[y * w + x];
      if (Math.hypot(x - bx, y - by) <= radius) continue;
      if (v >= r[y * w + x - 1] && v >= r[y * w + x + 1] && v >= r[(y - 1) * w + x] && v >= r[(y + 1) * w + x]) {
        if (v > runnerUp) runnerUp = v;
        if (v >= r[bi] - ALTERNATIVE_GAP) others.push({ x, y, score: v });
      }
    }
  }
  // One alternative per peak: drop local maxima within the radius of a better one.
  others.sort((a, b) => b.score - a.score);
  const kept: typeof others = [];
  for (const o of others) {
    if (kept.length >= MAX_ALTERNATIVES) break;
    if (kept.every((k) => Math.hypot(k.x - o.x, k.y - o.y) > radius)) kept.push(o);
  }
  others = kept;
  return { x: bx + peak(at(bx - 1, by), r[bi], at(bx + 1, by)), y: by + peak(at(bx, by - 1), r[bi], at(bx, by + 1)), score: r[bi], runnerUp, others };
}

/** Offset of a parabola's vertex through three equally spaced samples, within ±0.5. */
export function peak(l: number, c: number, r: number): number {
  const den = l - 2 * c + r;
  return den < 0 ? Math.max(-0.5, Math.min(0.5, (0.5 * (l - r)) / den)) : 0;
}

/** Bounding box of the image [−0.5, w−0.5] × [−0.5, h−0.5] under m, in pixel-centre coordinates. */
function bounds(m: Affine, w: number, h: number) {
  const pts = [
    [-0.5, -0.5],
    [w - 0.5, -0.5],
    [-0.5, h - 0.5],
    [w - 0.5, h - 0.5],
  ].map(([x, y]) => apply(m, x, y));
  const x0 = Math.min(...pts.map((p) => p[0])), y0 = Math.min(...pts.map((p) => p[1]));
  const x1 = Math.max(...pts.map((p) => p[0])), y1 = Math.max(...pts.map((p) => p[1]));
  // Shift so the box's first pixel centre lands on 0.
  return { x: x0 + 0.5, y: y0 + 0.5, w: x1 - x0, h: y1 - y0 };
}

function borderMean(l: GreyLevel): number {
  let s = 0, n = 0;
  for (let x = 0; x < l.width; x++) {
    s += l.data[x] + l.data[(l.height - 1) * l.width + x];
    n += 2;
  }
  for (let y = 0; y < l.height; y++) {
    s += l.data[y * l.width] + l.data[y * l.width + l.width - 1];
    n += 2;
  }
  return s / n;
}
