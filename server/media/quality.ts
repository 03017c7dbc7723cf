/**
 * Capture quality: sharpness, exposure and colour consistency (DESIGN §7). Pure functions over raw pixel arrays, no
 * I/O; the caller decodes with sharp. Every result becomes a plain warning, never a block.
 */
import { eyeCentres, type Landmarks68 } from './measurements.js';
import type { Point } from './umeyama.js';

export interface Rect {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** A decoded image: `channels` interleaved 8-bit samples per pixel, row-major. */
export interface RawImage {
  data: Uint8Array | Uint8ClampedArray | Buffer;
  width: number;
  height: number;
  channels: number;
}

export type Lab = readonly [number, number, number];

/** Integer rectangle clipped to the image; empty when it falls outside. */
export function clampRect(r: Rect, width: number, height: number): Rect {
  const x0 = Math.max(0, Math.floor(r.x)), y0 = Math.max(0, Math.floor(r.y));
  const x1 = Math.min(width, Math.ceil(r.x + r.width)), y1 = Math.min(height, Math.ceil(r.y + r.height));
  return { x: x0, y: y0, width: Math.max(0, x1 - x0), height: Math.max(0, y1 - y0) };
}

/** Luma (ITU-R BT.601 weights on the encoded values, as most sharpness tools use) as floats. */
export function toGray(img: RawImage): Float32Array {
  const { data, width, height, channels } = img;
  const out = new Float32Array(width * height);
  if (channels < 3) {
    for (let i = 0; i < out.length; i++) out[i] = data[i * channels];
    return out;
  }
  for (let i = 0, j = 0; i < out.length; i++, j += channels) out[i] = 0.299 * data[j] + 0.587 * data[j + 1] + 0.114 * data[j + 2];
  return out;
}

/**
 * Variance of the Laplacian (kernel [[0,1,0],[1,−4,1],[0,1,0]]) over the pixels of `region` whose 3×3 neighbourhood
 * lies inside the image (Pech-Pacheco et al., ICPR 2000). Higher is sharper. Population variance.
 */
export function laplacianVariance(gray: ArrayLike<number>, width: number, height: number, region?: Rect): number {
  const r = clampRect(region ?? { x: 0, y: 0, width, height }, width, height);
  const x0 = Math.max(1, r.x), y0 = Math.max(1, r.y);
  const x1 = Math.min(width - 1, r.x + r.width), y1 = Math.min(height - 1, r.y + r.height);
  let n = 0, sum = 0, sumSq = 0;
  for (let y = y0; y < y1; y++) {
    const row = y * width;
    for (let x = x0; x < x1; x++) {
      const i = row + x;
      const l = gray[i - width] + gray[i + width] + gray[i - 1] + gray[i + 1] - 4 * gray[i];
      sum += l;
      sumSq += l * l;
      n++;
    }
  }
  if (n === 0) return 0;
  const m = sum / n;
  return Math.max(0, sumSq / n - m * m);
}

/** Share of pixels in the region at or beyond the clipping thresholds (luma ≥ `bright`, ≤ `dark`). */
export function exposureClipping(gray: ArrayLike<number>, width: number, height: number, region?: Rect, opts: { dark?: number; bright?: number } = {}): { highlights: number; shadows: number } {
  const dark = opts.dark ?? 5, bright = opts.bright ?? 250;
  const r = clampRect(region ?? { x: 0, y: 0, width, height }, width, height);
  let hi = 0, lo = 0;
  for (let y = r.y; y < r.y + r.height; y++) {
    for (let x = r.x; x < r.x + r.width; x++) {
      const v = gray[y * width + x];
      if (v >= bright) hi++;
      else if (v <= dark) lo++;
    }
  }
  const n = r.width * r.height;
  return n === 0 ? { highlights: 0, shadows: 0 } : { highlights: hi / n, shadows: lo / n };
}

/** sRGB companding inverse (IEC 61966-2-1). */
function linear(c: number): number {
  const v = c / 255;
  return v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
}

// CIE standard illuminant D65 white, Y = 1, the white point of sRGB.
const XN = 0.95047, YN = 1, ZN = 1.08883;
const labF = (t: number) => (t > (6 / 29) ** 3 ? Math.cbrt(t) : t / (3 * (6 / 29) ** 2) + 4 / 29);

/** 8-bit sRGB to CIELAB (D65). */
export function srgbToLab(r: number, g: number, b: number): Lab {
  const R = linear(r), G = linear(g), B = linear(b);
  const X = 0.4124564 * R + 0.3575761 * G + 0.1804375 * B;
  const Y = 0.2126729 * R + 0.7151522 * G + 0.072175 * B;
  const Z = 0.0193339 * R + 0.119192 * G + 0.9503041 * B;
  const fx = labF(X / XN), fy = labF(Y / YN), fz = labF(Z / ZN);
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

const rad = (d: number) => (d * Math.PI) / 180;
const degOf = (r: number) => (r * 180) / Math.PI;

/**
 * CIEDE2000 colour difference, following the implementation notes of Sharma, Wu and Dalal (Color Res. Appl.
 * 30(1):21–30, 2005), including their rules for hue angles when a chroma is zero.
 */
export function ciede2000(lab1: Lab, lab2: Lab, kL = 1, kC = 1, kH = 1): number {
  const [L1, a1, b1] = lab1, [L2, a2, b2] = lab2;
  const C1 = Math.hypot(a1, b1), C2 = Math.hypot(a2, b2);
  const Cbar7 = ((C1 + C2) / 2) ** 7;
  const G = 0.5 * (1 - Math.sqrt(Cbar7 / (Cbar7 + 25 ** 7)));
  const a1p = (1 + G) * a1, a2p = (1 + G) * a2;
  const C1p = Math.hypot(a1p, b1), C2p = Math.hypot(a2p, b2);
  const hp = (a: number, b: number) => {
    if (a === 0 && b === 0) return 0;
    const h = degOf(Math.atan2(b, a));
    return h < 0 ? h + 360 : h;
  };
  const h1p = hp(a1p, b1), h2p = hp(a2p, b2);

  const dLp = L2 - L1;
  const dCp = C2p - C1p;
  let dhp = 0;
  if (C1p * C2p !== 0) {
    dhp = h2p - h1p;
    if (dhp > 180) dhp -= 360;
    else if (dhp < -180) dhp += 360;
  }
  const dHp = 2 * Math.sqrt(C1p * C2p) * Math.sin(rad(dhp / 2));

  const Lbp = (L1 + L2) / 2;
  const Cbp = (C1p + C2p) / 2;
  let hbp = h1p + h2p;
  if (C1p * C2p !== 0) {
    if (Math.abs(h1p - h2p) <= 180) hbp = (h1p + h2p) / 2;
    else hbp = h1p + h2p < 360 ? (h1p + h2p + 360) / 2 : (h1p + h2p - 360) / 2;
  }
  const T = 1 - 0.17 * Math.cos(rad(hbp - 30)) + 0.24 * Math.cos(rad(2 * hbp)) + 0.32 * Math.cos(rad(3 * hbp + 6)) - 0.2 * Math.cos(rad(4 * hbp - 63));
  const dTheta = 30 * Math.exp(-(((hbp - 275) / 25) ** 2));
  const Cbp7 = Cbp ** 7;
  const RC = 2 * Math.sqrt(Cbp7 / (Cbp7 + 25 ** 7));
  const SL = 1 + (0.015 * (Lbp - 50) ** 2) / Math.sqrt(20 + (Lbp - 50) ** 2);
  const SC = 1 + 0.045 * Cbp;
  const SH = 1 + 0.015 * Cbp * T;
  const RT = -Math.sin(rad(2 * dTheta)) * RC;
  const l = dLp / (kL * SL), c = dCp / (kC * SC), h = dHp / (kH * SH);
  return Math.sqrt(l * l + c * c + h * h + RT * c * h);
}

/**
 * Mean CIELAB colour of the pixels in the rectangles; near-clipped pixels (specular highlights, deep shadow) are
 * left out because they carry no skin colour. Null when no usable pixel remains.
 */
export function meanLab(img: RawImage, rects: readonly Rect[]): Lab | null {
  const { data, width, height, channels } = img;
  let L = 0, A = 0, B = 0, n = 0;
  for (const rect of rects) {
    const r = clampRect(rect, width, height);
    for (let y = r.y; y < r.y + r.height; y++) {
      for (let x = r.x; x < r.x + r.width; x++) {
        const j = (y * width + x) * channels;
        const R = data[j], G = data[j + 1], Bl = data[j + 2];
        if (Math.max(R, G, Bl) >= 250 || Math.max(R, G, Bl) <= 5) continue;
        const lab = srgbToLab(R, G, Bl);
        L += lab[0]; A += lab[1]; B += lab[2];
        n++;
      }
    }
  }
  return n === 0 ? null : [L / n, A / n, B / n];
}

/**
 * Two cheek patches chosen from a 68-point set: squares of side 0.25 IPD centred on the mean of the lower eyelid,
 * the nose wing and the jaw point at nose level (41, 31, 2 on the right; 46, 35, 14 on the left), which falls on the
 * flat of the cheek, away from the lips (which treatment changes), brows, hair and the shine of the nose.
 */
export function skinPatches(points: Landmarks68): Rect[] | null {
  const eyes = eyeCentres(points);
  if (!eyes) return null;
  const ipd = Math.hypot(eyes.left[0] - eyes.right[0], eyes.left[1] - eyes.right[1]);
  const side = 0.25 * ipd;
  const out: Rect[] = [];
  for (const idx of [[41, 31, 2], [46, 35, 14]]) {
    const ps = idx.map((i) => points[i]);
    if (ps.some((p) => !p)) return null;
    const c: Point = [ps.reduce((s, p) => s + p![0], 0) / 3, ps.reduce((s, p) => s + p![1], 0) / 3];
    out.push({ x: c[0] - side / 2, y: c[1] - side / 2, width: side, height: side });
  }
  return out;
}

/** Bounding box of the given points grown by `margin` of its size on each side (the face region for sharpness). */
export function pointsBox(points: readonly (Point | null | undefined)[], margin = 0.1): Rect | null {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity;
  for (const p of points) {
    if (!p) continue;
    x0 = Math.min(x0, p[0]); y0 = Math.min(y0, p[1]);
    x1 = Math.max(x1, p[0]); y1 = Math.max(y1, p[1]);
  }
  if (!Number.isFinite(x0)) return null;
  const w = x1 - x0, h = y1 - y0;
  return { x: x0 - w * margin, y: y0 - h * margin, width: w * (1 + 2 * margin), height: h * (1 + 2 * margin) };
}

export interface QualityReport {
  sharpness: number;
  highlights: number;
  shadows: number;
  skinLab: Lab | null;
}

export interface QualityWarning {
  code: 'blur' | 'blur-partner' | 'highlights' | 'shadows' | 'colour-partner';
  message: string;
}

/** Thresholds of the plain warnings. Rules of thumb (common practice), not published limits. */
export const QUALITY_LIMITS = {
  /** Variance of the Laplacian below ~100 on 8-bit luma is the usual "blurry" rule of thumb. */
  sharpness: 100,
  /** Warn when this photo is less than half as sharp as its partner. */
  sharpnessPartner: 0.5,
  highlights: 0.02,
  shadows: 0.05,
  /** ΔE00 about 2–3 is where most people notice a difference; above 5 the lighting or white balance clearly differ. */
  colourPartner: 5,
} as const;

/** Sharpness and exposure over `region`, and the mean skin colour over `skinRects`. */
export function assessQuality(img: RawImage, region: Rect | null, skinRects: readonly Rect[] | null): QualityReport {
  const gray = toGray(img);
  const r = region ?? { x: 0, y: 0, width: img.width, height: img.height };
  const exp = exposureClipping(gray, img.width, img.height, r);
  return {
    sharpness: laplacianVariance(gray, img.width, img.height, r),
    highlights: exp.highlights,
    shadows: exp.shadows,
    skinLab: skinRects ? meanLab(img, skinRects) : null,
  };
}

const pct = (x: number) => `${(x * 100).toFixed(1)} %`;

/** Plain warnings for one photo, and against its partner (the photo of the same view it is compared with). */
export function qualityWarnings(q: QualityReport, partner?: QualityReport | null): QualityWarning[] {
  const out: QualityWarning[] = [];
  if (q.sharpness < QUALITY_LIMITS.sharpness) out.push({ code: 'blur', message: 'The face looks out of focus or shaken.' });
  if (q.highlights > QUALITY_LIMITS.highlights) out.push({ code: 'highlights', message: `${pct(q.highlights)} of the face is blown out to white.` });
  if (q.shadows > QUALITY_LIMITS.shadows) out.push({ code: 'shadows', message: `${pct(q.shadows)} of the face is lost in black shadow.` });
  if (partner) {
    if (partner.sharpness > 0 && q.sharpness / partner.sharpness < QUALITY_LIMITS.sharpnessPartner) {
      out.push({ code: 'blur-partner', message: 'This photo is clearly less sharp than the one it is compared with.' });
    }
    if (q.skinLab && partner.skinLab) {
      const dE = ciede2000(q.skinLab, partner.skinLab);
      if (dE > QUALITY_LIMITS.colourPartner) {
        out.push({ code: 'colour-partner', message: `Skin colour differs from the compared photo (ΔE00 ${dE.toFixed(1)}); lighting or white balance may differ.` });
      }
    }
  }
  return out;
}
