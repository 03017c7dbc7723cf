/**
 * The second alignment step: after the landmark fit, the photo is registered to a reference frame (the view's
 * baseline, already aligned) over the view's stable region by ECC (register.ts), so two visits line up to a pixel
 * even where the lips themselves changed. The landmark fit stays when registration does not clearly improve it.
 */
import sharp from 'sharp';
import type { Rect } from './quality.js';
import { eccSimilarity, grayOf, type Gray } from './register.js';
import { applySimilarity, invertSimilarity, type Point, type Similarity } from './umeyama.js';

export interface Refinement {
  /** Photo → frame after registration (the landmark fit when not accepted). */
  transform: Similarity;
  rhoBefore: number;
  rhoAfter: number;
  /** Largest move of the stable region's corners against the landmark fit, frame pixels. */
  shiftPx: number;
  accepted: boolean;
}

/**
 * Limits on what registration may change: beyond them the stable region probably matched something else (a
 * different expression, hair over the brow), and the landmark fit is the safer answer. Frame pixels; a frontal
 * frame's eye distance is 300 px.
 */
export const REFINE_LIMITS = { maxShiftPx: 45, maxScaleChange: 0.08 } as const;

/**
 * Registers `image` (grey, in photo pixels) to `reference` (grey, in frame pixels) over `region`, starting from the
 * landmark fit `fitted` (photo → frame). Pure.
 */
export function refineTransform(reference: Gray, region: Rect, image: Gray, fitted: Similarity): Refinement {
  const init = invertSimilarity(fitted);
  const before = eccSimilarity(reference, region, image, init, { levels: 0, iterations: [0] });
  const after = eccSimilarity(reference, region, image, init, { step: 2 });
  const refined = invertSimilarity(after.transform);
  const corners: Point[] = [
    [region.x, region.y],
    [region.x + region.width, region.y],
    [region.x, region.y + region.height],
    [region.x + region.width, region.y + region.height],
  ];
  const shiftPx = Math.max(
    ...corners.map((c) => {
      const q = applySimilarity(after.transform, c);
      const back = applySimilarity(fitted, q);
      return Math.hypot(back[0] - c[0], back[1] - c[1]);
    }),
  );
  const scaleChange = Math.abs(refined.scale / fitted.scale - 1);
  const accepted =
    after.coverage > 0.9 && after.rho > before.rho && shiftPx <= REFINE_LIMITS.maxShiftPx && scaleChange <= REFINE_LIMITS.maxScaleChange;
  return { transform: accepted ? refined : fitted, rhoBefore: before.rho, rhoAfter: after.rho, shiftPx, accepted };
}

/** Grey pixels of an encoded image (auto-oriented), optionally smoothed by a Gaussian of `sigma` pixels. */
export async function decodeGray(image: Buffer, sigma = 0): Promise<Gray> {
  let pipeline = sharp(image, { failOn: 'error' }).rotate().greyscale();
  if (sigma >= 0.3) pipeline = pipeline.blur(sigma);
  const { data, info } = await pipeline.raw().toBuffer({ resolveWithObject: true });
  return grayOf(data, info.width, info.height, info.channels);
}

/**
 * Registers an encoded photo to an encoded reference frame, at the photo's own pixels. A photo larger than the frame
 * is smoothed first (a Gaussian of half a frame pixel), so sampling it at the frame's spacing does not alias; the
 * geometry stays exact.
 */
export async function refineAgainst(referenceFrame: Buffer, region: Rect, photo: Buffer, fitted: Similarity): Promise<Refinement> {
  const sigma = fitted.scale < 0.8 ? 0.5 / fitted.scale : 0;
  const [reference, image] = await Promise.all([decodeGray(referenceFrame), decodeGray(photo, sigma)]);
  return refineTransform(reference, region, image, fitted);
}
