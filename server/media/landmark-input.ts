/**
 * The one check of landmark input, whether it comes from the editor (PUT landmarks) or from the detector: a full
 * 68-point set (entries not placed are null), the view's anchors, and an optional ruler for a mm scale.
 * Pure; the routes turn the issues into a 400.
 */
import { z } from 'zod';
import type { Point } from './umeyama.js';
import { anchorsFrom68, type ViewDef } from './views.js';

/** Two anchors or ruler ends closer than this (in pixels) count as coinciding. */
export const MIN_ANCHOR_DISTANCE_PX = 4;
export const MAX_RULER_MM = 1000;

const coord = z.number();
const point = z.tuple([coord, coord]);

/** Shape of the editable landmark data; geometry is checked by `checkLandmarks`. */
export const landmarkInputSchema = z.object({
  points: z.array(point.nullable()).nullable().optional(),
  anchors: z.array(point).nullable().optional(),
  ruler: z.object({ a: point, b: point, lengthMm: z.number() }).nullable().optional(),
});
export type LandmarkInput = z.infer<typeof landmarkInputSchema>;

export interface LandmarkIssue {
  path: (string | number)[];
  message: string;
}

export interface CheckedLandmarks {
  points: (Point | null)[] | null;
  /** The anchors alignment uses: read from the 68 points when they hold them, else as placed by hand. */
  anchors: Point[] | null;
  anchorsFrom: 'points' | 'placed' | null;
  ruler: { a: Point; b: Point; lengthMm: number } | null;
}

const finite = (p: readonly number[]) => Number.isFinite(p[0]) && Number.isFinite(p[1]);

/**
 * Checks landmarks against the image they belong to and the view's anchor definitions: the right number of points,
 * finite numbers, every point inside the image, anchors (given or read from the points) that do not coincide.
 */
export function checkLandmarks(
  input: LandmarkInput,
  image: { width: number; height: number },
  view: ViewDef,
): { ok: true; value: CheckedLandmarks } | { ok: false; issues: LandmarkIssue[] } {
  const issues: LandmarkIssue[] = [];
  const inside = (p: readonly number[], path: (string | number)[], what: string) => {
    if (!finite(p)) {
      issues.push({ path, message: `${what} is not a finite number.` });
      return false;
    }
    if (p[0] < 0 || p[1] < 0 || p[0] > image.width || p[1] > image.height) {
      issues.push({ path, message: `${what} lies outside the ${image.width}×${image.height} image.` });
      return false;
    }
    return true;
  };
  const apart = (ps: readonly Point[], path: (string | number)[], what: string) => {
    for (let i = 0; i < ps.length; i++) {
      for (let j = i + 1; j < ps.length; j++) {
        if (Math.hypot(ps[i][0] - ps[j][0], ps[i][1] - ps[j][1]) < MIN_ANCHOR_DISTANCE_PX) {
          issues.push({ path, message: `${what} ${i + 1} and ${j + 1} coincide.` });
        }
      }
    }
  };

  const points = input.points ?? null;
  if (points) {
    if (points.length !== 68) issues.push({ path: ['points'], message: `Expected 68 landmark slots, got ${points.length}.` });
    else points.forEach((p, i) => p && inside(p, ['points', i], `Landmark ${i}`));
  }

  let anchors: Point[] | null = null;
  let anchorsFrom: CheckedLandmarks['anchorsFrom'] = null;
  const needed = new Set(view.anchors.flatMap((a) => a.from68));
  const pointsHoldAnchors = !!points && points.length === 68 && [...needed].every((i) => points[i]);
  if (input.anchors) {
    if (input.anchors.length !== view.anchors.length) {
      issues.push({ path: ['anchors'], message: `${view.label} needs ${view.anchors.length} anchors, got ${input.anchors.length}.` });
    } else if (input.anchors.every((p, i) => inside(p, ['anchors', i], `Anchor ${i + 1}`))) {
      anchors = input.anchors.map((p) => [p[0], p[1]] as Point);
      anchorsFrom = 'placed';
    }
  }
  if (pointsHoldAnchors && issues.length === 0) {
    anchors = anchorsFrom68(view, points as Point[]);
    anchorsFrom = 'points';
  }
  if (anchors) apart(anchors, ['anchors'], 'Anchors');

  let ruler: CheckedLandmarks['ruler'] = null;
  if (input.ruler) {
    const { a, b, lengthMm } = input.ruler;
    const okA = inside(a, ['ruler', 'a'], 'Ruler end 1');
    const okB = inside(b, ['ruler', 'b'], 'Ruler end 2');
    if (!(Number.isFinite(lengthMm) && lengthMm > 0 && lengthMm <= MAX_RULER_MM)) {
      issues.push({ path: ['ruler', 'lengthMm'], message: `The ruler length must be between 0 and ${MAX_RULER_MM} mm.` });
    }
    if (okA && okB) apart([a, b], ['ruler'], 'Ruler ends');
    ruler = { a: [a[0], a[1]], b: [b[0], b[1]], lengthMm };
  }

  if (!points && !input.anchors) issues.push({ path: [], message: 'Give the 68 landmarks or the anchors of the view.' });
  if (issues.length) return { ok: false, issues };
  return {
    ok: true,
    value: { points: points ? points.map((p) => (p ? ([p[0], p[1]] as Point) : null)) : null, anchors, anchorsFrom, ruler },
  };
}
