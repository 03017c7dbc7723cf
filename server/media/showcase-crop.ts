/**
 * The lips-only crop for showcase exports: a box around the lips (iBUG 300-W points 48–67) that never reaches
 * the nose tip (30) or the eyes (36–47), so a patient who allowed only a lips-only crop cannot be recognised
 * by the eye region.
 */
export interface Box {
  left: number;
  top: number;
  width: number;
  height: number;
}

type XY = { x: number; y: number };

const LIPS = Array.from({ length: 20 }, (_, i) => 48 + i);
const EYES = Array.from({ length: 12 }, (_, i) => 36 + i);
const NOSE_TIP = 30;

/**
 * Returns the crop box in the same pixel frame as `points`, or null when the lips are not all placed.
 * Margins: 35% of the mouth width left and right, 45% of the lip height below; above, half the gap up to the
 * nose tip at most. The box keeps an aspect no narrower than 4:3 by widening, clipped to the image.
 */
export function lipsOnlyCropBox(points: readonly (XY | null)[], image: { width: number; height: number }): Box | null {
  const lips = LIPS.map((i) => points[i]);
  if (lips.some((p) => !p)) return null;
  const xs = lips.map((p) => p!.x);
  const ys = lips.map((p) => p!.y);
  const minX = Math.min(...xs);
  const maxX = Math.max(...xs);
  const minY = Math.min(...ys);
  const maxY = Math.max(...ys);
  const mouthW = maxX - minX;
  const lipH = maxY - minY;

  // The highest the box may reach: below the nose tip and below every placed eye point.
  const ceilingCandidates = [points[NOSE_TIP], ...EYES.map((i) => points[i])].filter((p): p is XY => Boolean(p)).map((p) => p.y);
  const ceiling = ceilingCandidates.length ? Math.max(...ceilingCandidates.filter((y) => y < minY), -Infinity) : -Infinity;
  const gapAbove = Number.isFinite(ceiling) ? minY - ceiling : lipH;
  let top = minY - Math.min(lipH * 0.45, gapAbove * 0.5);
  if (Number.isFinite(ceiling)) top = Math.max(top, ceiling + 1);
  let bottom = maxY + lipH * 0.45;
  let left = minX - mouthW * 0.35;
  let right = maxX + mouthW * 0.35;

  // No narrower than 4:3: widen around the centre rather than grow upwards.
  const minWidth = ((bottom - top) * 4) / 3;
  if (right - left < minWidth) {
    const extra = (minWidth - (right - left)) / 2;
    left -= extra;
    right += extra;
  }
  left = Math.max(0, Math.floor(left));
  top = Math.max(0, Math.ceil(top));
  right = Math.min(image.width, Math.ceil(right));
  bottom = Math.min(image.height, Math.ceil(bottom));
  if (right - left < 2 || bottom - top < 2) return null;
  return { left, top, width: right - left, height: bottom - top };
}

/** Maps points through a row-major 2×3 affine matrix (e.g. display pixels → aligned frame). */
export function mapPoints(points: readonly (XY | null)[], m: readonly [readonly number[], readonly number[]]): (XY | null)[] {
  return points.map((p) => (p ? { x: m[0][0] * p.x + m[0][1] * p.y + m[0][2], y: m[1][0] * p.x + m[1][1] * p.y + m[1][2] } : null));
}

/** True when no eye point and no point above the nose tip lies inside the box. */
export function boxIsLipsOnly(box: Box, points: readonly (XY | null)[]): boolean {
  const inside = (p: XY | null) => p !== null && p.x >= box.left && p.x <= box.left + box.width && p.y >= box.top && p.y <= box.top + box.height;
  const nose = points[NOSE_TIP];
  if (nose && box.top <= nose.y) return false;
  return !EYES.some((i) => inside(points[i] ?? null));
}
