/**
 * The aligned photo: the photo resampled by the similarity transform from its anchors to the view's standard frame
 * (DESIGN §7), so two visits of a view line up pixel for pixel.
 *
 * Coordinates are continuous pixel coordinates with (0, 0) at the image's top-left corner (pixel i covers [i, i+1)).
 */
import sharp, { type Sharp } from 'sharp';
import { residualRms, toAffine, umeyama, type AffineMatrix, type Point, type Similarity } from './umeyama.js';
import type { FitPoints, ViewDef } from './views.js';

export type AlignedFormat = 'jpeg' | 'webp';

export interface RenderOptions {
  /** Encoded output; the first is `data`, every one is in `encoded`. Default JPEG. */
  formats?: AlignedFormat[];
  quality?: number;
  /** Also hand back the frame's raw RGB pixels (for quality checks) without decoding an encoded copy. */
  raw?: boolean;
}

export interface Rendered {
  data: Buffer;
  format: AlignedFormat;
  encoded: { format: AlignedFormat; data: Buffer }[];
  width: number;
  height: number;
  raw?: { data: Buffer; width: number; height: number; channels: 3 };
}

export interface AlignResult extends Rendered {
  /** Photo → frame. */
  transform: Similarity;
  /** The same as a row-major 2×3 matrix, as stored on the photo. */
  matrix: AffineMatrix;
  /** RMS distance of the fitted points from their frame positions after the transform, frame pixels (0 for two anchors). */
  residual: number;
}

/** Neutral grey around the photo where the frame reaches past it (DESIGN §9: no coloured frames). */
export const FRAME_BACKGROUND = { r: 128, g: 128, b: 128 };

/** Fits the view's transform: the photo's points (its pixels) onto their frame positions, least squares (FACTS 1). */
export function viewTransform(fit: FitPoints): { transform: Similarity; residual: number } {
  const transform = umeyama(fit.src, fit.dst);
  return { transform, residual: residualRms(transform, fit.src, fit.dst) };
}

/**
 * Resamples `image` (auto-oriented) by `transform` into a `frame` sized output, encoded as JPEG and/or WebP.
 *
 * Downscaling is done first with a Lanczos resize (which filters, unlike the affine's interpolator, so detail does
 * not alias), then the remaining rotation with a bicubic affine. Only the part of the photo that lands in the frame is
 * decoded and transformed. sharp runs the affine before any crop it could apply, so the cut to the frame is a second
 * pass over raw pixels.
 */
/** The same WebP quality as the display copy: keeps a pair of real photographs under ~500 KB (bench:compare). */
export const ALIGNED_WEBP_QUALITY = 82;

export async function renderAligned(
  image: Buffer,
  transform: Similarity,
  frame: { width: number; height: number },
  opts: RenderOptions = {},
): Promise<Rendered> {
  const formats = opts.formats?.length ? opts.formats : (['jpeg'] as AlignedFormat[]);
  const meta = await sharp(image, { failOn: 'error' }).metadata();
  const swap = (meta.orientation ?? 1) >= 5;
  const W = (swap ? meta.height : meta.width) ?? 0;
  const H = (swap ? meta.width : meta.height) ?? 0;
  if (!W || !H) throw new Error('The image has no size.');

  const { scale: c, angle } = transform;
  const cos = Math.cos(angle), sin = Math.sin(angle);
  const [tx, ty] = transform.translation;

  // The frame's corners mapped back into the photo give the region to read (with a margin for the interpolator).
  const inv = (X: number, Y: number): Point => {
    const dx = X - tx, dy = Y - ty;
    return [(cos * dx + sin * dy) / c, (-sin * dx + cos * dy) / c];
  };
  const corners = [inv(0, 0), inv(frame.width, 0), inv(0, frame.height), inv(frame.width, frame.height)];
  const margin = 3 / Math.min(c, 1);
  const cx0 = Math.max(0, Math.floor(Math.min(...corners.map((p) => p[0])) - margin));
  const cy0 = Math.max(0, Math.floor(Math.min(...corners.map((p) => p[1])) - margin));
  const cx1 = Math.min(W, Math.ceil(Math.max(...corners.map((p) => p[0])) + margin));
  const cy1 = Math.min(H, Math.ceil(Math.max(...corners.map((p) => p[1])) + margin));

  const finish = async (img: Sharp): Promise<Rendered> => {
    const encoded = await Promise.all(
      formats.map(async (format) => ({
        format,
        data: await (format === 'webp'
          ? img.clone().webp({ quality: opts.quality ?? ALIGNED_WEBP_QUALITY, effort: 2 })
          : img.clone().jpeg({ quality: opts.quality ?? 88 })
        ).toBuffer(),
      })),
    );
    const raw = opts.raw ? { data: await img.clone().raw().toBuffer(), width: frame.width, height: frame.height, channels: 3 as const } : undefined;
    return { data: encoded[0].data, format: encoded[0].format, encoded, width: frame.width, height: frame.height, ...(raw ? { raw } : {}) };
  };
  const blank = () => finish(sharp({ create: { width: frame.width, height: frame.height, channels: 3, background: FRAME_BACKGROUND } }));
  if (cx1 - cx0 < 2 || cy1 - cy0 < 2) return blank();

  const cw = cx1 - cx0, ch = cy1 - cy0;
  let pipeline = sharp(image, { failOn: 'error' }).rotate().removeAlpha().extract({ left: cx0, top: cy0, width: cw, height: ch });
  let rw = cw, rh = ch;
  if (c < 1) {
    rw = Math.max(2, Math.round(cw * c));
    rh = Math.max(2, Math.round(ch * c));
    pipeline = pipeline.resize(rw, rh, { fit: 'fill', kernel: 'lanczos3' });
  }
  const sx = rw / cw, sy = rh / ch;
  // Frame = c·R·(crop origin + r / s) + t, for r in the resized crop.
  const a = [(c * cos) / sx, (-c * sin) / sy, (c * sin) / sx, (c * cos) / sy] as [number, number, number, number];
  /*
   * libvips maps pixel centres (index + ½ in these coordinates) and starts its output at the rounded corner of the
   * bounding box of the transformed input: output = A·x + k − round(bboxMin) + od, with k = (½, ½) − A·(½, ½)
   * (measured on the centroid of a blob over random transforms; the media-align test keeps it checked).
   * Frame = A·x + c·R·cropOrigin + t, so the frame starts at −T in the output; the whole-pixel part of −T becomes the
   * crop of the second pass and the fraction goes into od.
   */
  const box = [[0, 0], [rw, 0], [0, rh], [rw, rh]].map(([x, y]) => [a[0] * x + a[1] * y, a[2] * x + a[3] * y]);
  const bx = Math.round(Math.min(...box.map((p) => p[0]))), by = Math.round(Math.min(...box.map((p) => p[1])));
  const kx = 0.5 - (a[0] + a[1]) / 2, ky = 0.5 - (a[2] + a[3]) / 2;
  const Tx = -kx + bx + c * (cos * cx0 - sin * cy0) + tx;
  const Ty = -ky + by + c * (sin * cx0 + cos * cy0) + ty;
  const ox = Math.round(-Tx), oy = Math.round(-Ty);

  const warped = await pipeline
    .affine(a, { background: FRAME_BACKGROUND, interpolator: sharp.interpolators.bicubic, odx: ox + Tx, ody: oy + Ty })
    .raw()
    .toBuffer({ resolveWithObject: true });
  const { width: bw, height: bh, channels } = warped.info;

  // Frame pixel X sits at warped pixel X + ox; take the overlap and pad the rest with the background.
  const left = Math.max(0, ox), top = Math.max(0, oy);
  const right = Math.min(bw, ox + frame.width), bottom = Math.min(bh, oy + frame.height);
  if (right - left < 1 || bottom - top < 1) return blank();
  const out = sharp(warped.data, { raw: { width: bw, height: bh, channels } })
    .extract({ left, top, width: right - left, height: bottom - top })
    .extend({
      left: left - ox,
      top: top - oy,
      right: ox + frame.width - right,
      bottom: oy + frame.height - bottom,
      background: FRAME_BACKGROUND,
    });
  return finish(out);
}

/** Renders the aligned photo by `transform` (fitted, maybe refined) in the view's standard frame. */
export async function alignPhoto(image: Buffer, view: ViewDef, transform: Similarity, residual: number, opts: RenderOptions = {}): Promise<AlignResult> {
  const rendered = await renderAligned(image, transform, view.frame, opts);
  return { ...rendered, transform, matrix: toAffine(transform), residual };
}
