/**
 * Lip measurements from landmarks: pure functions, no I/O (DESIGN §7).
 *
 * Indices are the iBUG 300-W 68-point markup, 0-based (FACTS 5): lip corners (cheilion) 48 and 54, cupid's-bow
 * peaks 50 and 52, upper-lip midpoint (≈ labrale superius) 51, lower-lip midpoint (≈ labrale inferius) 57, inner
 * upper midpoint 62 and inner lower midpoint 66 (together ≈ stomion), inner eye corners (endocanthion) 39 and 42,
 * eyes 36–41 (the subject's right) and 42–47.
 *
 * Definitions (FACTS 6): upper vermilion height = labrale superius 51 → stomion (inner midline 62); lower vermilion
 * height = stomion (66) → labrale inferius 57; mouth width = cheilion 48 → cheilion 54. Heights are measured along
 * the face's vertical axis, perpendicular to the line through the eye centres, so a tilted head does not shorten
 * them; when the eyes are not marked (a lips close-up) the line through the lip corners stands in for the eye line.
 *
 * Lengths are given in pixels, in units of the interpupillary distance (or of the mouth width when the eyes are not
 * marked), and in mm when a scale is known. These numbers are guides for the practitioner, not treatment targets.
 */
import type { Point } from './umeyama.js';

/** A landmark set in the 68-point markup; entries not placed (e.g. the eyes on a lips close-up) are null. */
export type Landmarks68 = readonly (Point | null | undefined)[];

/** Mean adult interpupillary distance, used only for an approximate mm scale (Dodgson, SPIE 2004; FACTS 9, from memory). */
export const MEAN_IPD_MM = 63;

export const LIP_POINTS = Array.from({ length: 20 }, (_, i) => 48 + i);
const RIGHT_EYE = [36, 37, 38, 39, 40, 41];
const LEFT_EYE = [42, 43, 44, 45, 46, 47];
/** Upper vermilion outline: outer edge from corner to corner, then the inner edge back. */
const UPPER_LIP_POLYGON = [48, 49, 50, 51, 52, 53, 54, 64, 63, 62, 61, 60];
/** Lower vermilion outline: outer edge from the left corner back to the right, then the inner edge. */
const LOWER_LIP_POLYGON = [54, 55, 56, 57, 58, 59, 48, 60, 67, 66, 65, 64];

export interface Scale {
  mmPerPx: number;
  /** `ruler`: from two points on a ruler or marker of known length; `mean-ipd`: approximate, from an average IPD. */
  source: 'ruler' | 'mean-ipd';
  approximate: boolean;
}

export interface Length {
  px: number;
  /** In units of `LipMeasurements.unit`. */
  rel: number;
  mm: number | null;
}

export interface Area {
  px2: number;
  rel: number;
  mm2: number | null;
}

export interface LipSymmetry {
  /** The subject's right half (side of lip corner 48). */
  right: Area;
  left: Area;
  /** Smaller half / larger half: 1 is perfectly symmetric. */
  symmetry: number | null;
  whole: Area;
}

export interface LipMeasurements {
  unit: 'ipd' | 'mouth-width';
  unitPx: number;
  axis: 'eye-line' | 'lip-corners';
  scale: Scale | null;
  upperHeight: Length;
  lowerHeight: Length;
  /** x of the upper:lower ratio written 1:x (lower height / upper height); null when the upper height is not positive. */
  ratio: number | null;
  mouthWidth: Length;
  /** Commissure–commissure line against the endocanthion–commissure line, degrees (FACTS 8); null without the eyes. */
  commissureAngle: { right: number | null; left: number | null; difference: number | null };
  cupidsBow: { rightPeakHeight: Length; leftPeakHeight: Length; peakToPeak: Length };
  upperLip: LipSymmetry;
  lowerLip: LipSymmetry;
  totalArea: Area;
}

export class MeasurementInputError extends Error {}

const sub = (a: Point, b: Point): Point => [a[0] - b[0], a[1] - b[1]];
const dot = (a: Point, b: Point) => a[0] * b[0] + a[1] * b[1];
const dist = (a: Point, b: Point) => Math.hypot(a[0] - b[0], a[1] - b[1]);
const mean = (ps: Point[]): Point => [ps.reduce((s, p) => s + p[0], 0) / ps.length, ps.reduce((s, p) => s + p[1], 0) / ps.length];

function need(points: Landmarks68, i: number): Point {
  const p = points[i];
  if (!p || !Number.isFinite(p[0]) || !Number.isFinite(p[1])) throw new MeasurementInputError(`Landmark ${i} is missing.`);
  return p;
}

function has(points: Landmarks68, idx: readonly number[]): boolean {
  return idx.every((i) => {
    const p = points[i];
    return !!p && Number.isFinite(p[0]) && Number.isFinite(p[1]);
  });
}

/** Centres of the subject's right and left eye (means of 36–41 and 42–47), or null when not marked. */
export function eyeCentres(points: Landmarks68): { right: Point; left: Point } | null {
  if (!has(points, RIGHT_EYE) || !has(points, LEFT_EYE)) return null;
  return { right: mean(RIGHT_EYE.map((i) => need(points, i))), left: mean(LEFT_EYE.map((i) => need(points, i))) };
}

/** Scale from two points placed on a ruler or marker whose distance is known. */
export function rulerScale(a: Point, b: Point, lengthMm: number): Scale {
  const d = dist(a, b);
  if (!(lengthMm > 0) || !Number.isFinite(lengthMm)) throw new MeasurementInputError('The ruler length must be a positive number of mm.');
  if (!(d > 0) || !Number.isFinite(d)) throw new MeasurementInputError('The two ruler points coincide.');
  return { mmPerPx: lengthMm / d, source: 'ruler', approximate: false };
}

/** Approximate scale from the mean adult IPD; shown labelled as approximate. */
export function meanIpdScale(ipdPx: number): Scale {
  if (!(ipdPx > 0)) throw new MeasurementInputError('The eye centres coincide.');
  return { mmPerPx: MEAN_IPD_MM / ipdPx, source: 'mean-ipd', approximate: true };
}

/** Shoelace area of a simple polygon (absolute value). */
export function polygonArea(poly: readonly Point[]): number {
  let s = 0;
  for (let i = 0; i < poly.length; i++) {
    const p = poly[i], q = poly[(i + 1) % poly.length];
    s += p[0] * q[1] - q[0] * p[1];
  }
  return Math.abs(s) / 2;
}

/** Part of a polygon on the side of the line through `origin` where (p − origin)·normal ≤ 0 (Sutherland–Hodgman, one edge). */
export function clipHalfPlane(poly: readonly Point[], origin: Point, normal: Point): Point[] {
  const out: Point[] = [];
  const side = (p: Point) => dot(sub(p, origin), normal);
  for (let i = 0; i < poly.length; i++) {
    const p = poly[i], q = poly[(i + 1) % poly.length];
    const sp = side(p), sq = side(q);
    if (sp <= 0) out.push(p);
    if ((sp < 0 && sq > 0) || (sp > 0 && sq < 0)) {
      const t = sp / (sp - sq);
      out.push([p[0] + t * (q[0] - p[0]), p[1] + t * (q[1] - p[1])]);
    }
  }
  return out;
}

function angleDeg(at: Point, a: Point, b: Point): number {
  const u = sub(a, at), v = sub(b, at);
  const c = dot(u, v) / (Math.hypot(...u) * Math.hypot(...v));
  return (Math.acos(Math.min(1, Math.max(-1, c))) * 180) / Math.PI;
}

/**
 * All lip measurements of one photo. Needs the lip points 48–67; the eyes 36–47 (for the IPD unit, the eye-line axis
 * and the approximate scale) and endocanthion 39/42 (for the commissure angles) when present.
 * `scale`: a measured scale (e.g. from `rulerScale`); without one, photos with eyes get the approximate mean-IPD scale.
 */
export function measureLips(points: Landmarks68, opts: { scale?: Scale | null } = {}): LipMeasurements {
  if (points.length !== 68) throw new MeasurementInputError('Expected 68 landmark slots.');
  const p = (i: number) => need(points, i);
  for (const i of LIP_POINTS) p(i);

  const eyes = eyeCentres(points);
  const mouthWidthPx = dist(p(48), p(54));
  let axisX: Point;
  let unitPx: number;
  if (eyes) {
    unitPx = dist(eyes.right, eyes.left);
    if (!(unitPx > 0)) throw new MeasurementInputError('The eye centres coincide.');
    axisX = [(eyes.left[0] - eyes.right[0]) / unitPx, (eyes.left[1] - eyes.right[1]) / unitPx];
  } else {
    unitPx = mouthWidthPx;
    if (!(unitPx > 0)) throw new MeasurementInputError('The lip corners coincide.');
    axisX = [(p(54)[0] - p(48)[0]) / unitPx, (p(54)[1] - p(48)[1]) / unitPx];
  }
  // Rotating the subject's right→left direction by +90° in image coordinates (y down) points down the face.
  const axisY: Point = [-axisX[1], axisX[0]];

  const scale = opts.scale ?? (eyes ? meanIpdScale(unitPx) : null);
  const len = (px: number): Length => ({ px, rel: px / unitPx, mm: scale ? px * scale.mmPerPx : null });
  const area = (px2: number): Area => ({ px2, rel: px2 / unitPx ** 2, mm2: scale ? px2 * scale.mmPerPx ** 2 : null });
  const down = (from: Point, to: Point) => dot(sub(to, from), axisY);

  const upperPx = down(p(51), p(62));
  const lowerPx = down(p(66), p(57));

  let commissureAngle: LipMeasurements['commissureAngle'] = { right: null, left: null, difference: null };
  if (has(points, [39, 42])) {
    const right = angleDeg(p(48), p(54), p(39));
    const left = angleDeg(p(54), p(48), p(42));
    commissureAngle = { right, left, difference: Math.abs(right - left) };
  }

  // Midline for the left/right split: along the face's vertical axis through the midpoint of the lip corners. The
  // mouth lies in front of the eyes, so under a small head turn the eye midpoint drifts off the lips' middle while
  // the corners' midpoint stays with them.
  const mid = mean([p(48), p(54)]);
  const symmetry = (idx: number[]): LipSymmetry => {
    const poly = idx.map(p);
    const wholePx = polygonArea(poly);
    const rightPx = polygonArea(clipHalfPlane(poly, mid, axisX));
    const leftPx = polygonArea(clipHalfPlane(poly, mid, [-axisX[0], -axisX[1]]));
    const big = Math.max(rightPx, leftPx);
    return { right: area(rightPx), left: area(leftPx), symmetry: big > 0 ? Math.min(rightPx, leftPx) / big : null, whole: area(wholePx) };
  };
  const upperLip = symmetry(UPPER_LIP_POLYGON);
  const lowerLip = symmetry(LOWER_LIP_POLYGON);

  return {
    unit: eyes ? 'ipd' : 'mouth-width',
    unitPx,
    axis: eyes ? 'eye-line' : 'lip-corners',
    scale,
    upperHeight: len(upperPx),
    lowerHeight: len(lowerPx),
    ratio: upperPx > 0 ? lowerPx / upperPx : null,
    mouthWidth: len(mouthWidthPx),
    commissureAngle,
    cupidsBow: {
      rightPeakHeight: len(down(p(50), p(51))),
      leftPeakHeight: len(down(p(52), p(51))),
      peakToPeak: len(dist(p(50), p(52))),
    },
    upperLip,
    lowerLip,
    totalArea: area(upperLip.whole.px2 + lowerLip.whole.px2),
  };
}

/** Formats the ratio as the trade writes it, e.g. `1:1.6`. */
export function formatRatio(x: number | null, digits = 1): string {
  return x === null ? '—' : `1:${x.toFixed(digits)}`;
}

export interface Change {
  from: number;
  to: number;
  delta: number;
  /** Relative change in percent; null when the baseline is 0. */
  pct: number | null;
}

export interface MeasurementChange {
  /** Relative values compare only when both photos use the same unit. */
  unit: LipMeasurements['unit'] | null;
  upperHeight: Change | null;
  lowerHeight: Change | null;
  ratio: Change | null;
  mouthWidth: Change | null;
  totalArea: Change | null;
  upperArea: Change | null;
  lowerArea: Change | null;
  commissureDifference: Change | null;
  /** Same quantities in mm / mm², when both photos have a scale. */
  mm: { upperHeight: Change; lowerHeight: Change; mouthWidth: Change; totalArea: Change } | null;
}

function change(from: number | null, to: number | null): Change | null {
  if (from === null || to === null || !Number.isFinite(from) || !Number.isFinite(to)) return null;
  return { from, to, delta: to - from, pct: from !== 0 ? ((to - from) / Math.abs(from)) * 100 : null };
}

/** Change of a photo's measurements against a chosen baseline (e.g. the first visit). */
export function changeSince(current: LipMeasurements, baseline: LipMeasurements): MeasurementChange {
  const same = current.unit === baseline.unit;
  const rel = (f: (m: LipMeasurements) => number) => (same ? change(f(baseline), f(current)) : null);
  const bothMm = current.scale && baseline.scale;
  return {
    unit: same ? current.unit : null,
    upperHeight: rel((m) => m.upperHeight.rel),
    lowerHeight: rel((m) => m.lowerHeight.rel),
    ratio: change(baseline.ratio, current.ratio),
    mouthWidth: rel((m) => m.mouthWidth.rel),
    totalArea: rel((m) => m.totalArea.rel),
    upperArea: rel((m) => m.upperLip.whole.rel),
    lowerArea: rel((m) => m.lowerLip.whole.rel),
    commissureDifference: change(baseline.commissureAngle.difference, current.commissureAngle.difference),
    mm: bothMm
      ? {
          upperHeight: change(baseline.upperHeight.mm, current.upperHeight.mm)!,
          lowerHeight: change(baseline.lowerHeight.mm, current.lowerHeight.mm)!,
          mouthWidth: change(baseline.mouthWidth.mm, current.mouthWidth.mm)!,
          totalArea: change(baseline.totalArea.mm2, current.totalArea.mm2)!,
        }
      : null,
  };
}
