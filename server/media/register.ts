/**
 * Image registration by the enhanced correlation coefficient (ECC; Evangelidis & Psarakis, "Parametric image alignment
 * using enhanced correlation coefficient maximization", IEEE TPAMI 30(10):1858–1865, 2008; from memory), with a
 * similarity motion (scale, rotation, translation) and a coarse-to-fine pyramid. Pure functions over grey pixels.
 *
 * Written here because no package does it: OpenCV's findTransformECC (in the opencv.js builds on npm) knows
 * translation, Euclidean, affine and homography motions but not a similarity — an affine fit would let shear and
 * unequal scaling in, which a change of camera distance never produces — and it would bring a 10 MB WebAssembly
 * build for one function. ECC suits clinic photos: the correlation coefficient ignores a change of exposure or
 * contrast between visits, and the fit runs over a mask (the stable region), so lips that changed do not pull it.
 *
 * Coordinates are continuous pixel coordinates, (0, 0) at the top-left corner, pixel i covering [i, i+1), as in align.ts.
 */
import type { Rect } from './quality.js';
import type { Similarity } from './umeyama.js';

/** Grey levels as floats, row-major. */
export interface Gray {
  data: Float32Array;
  width: number;
  height: number;
}

/** Luma (BT.601 weights on the encoded values) of interleaved 8-bit pixels. */
export function grayOf(data: Uint8Array | Buffer, width: number, height: number, channels: number): Gray {
  const out = new Float32Array(width * height);
  if (channels < 3) for (let i = 0; i < out.length; i++) out[i] = data[i * channels];
  else for (let i = 0, j = 0; i < out.length; i++, j += channels) out[i] = 0.299 * data[j] + 0.587 * data[j + 1] + 0.114 * data[j + 2];
  return { data: out, width, height };
}

/** Half-size copy by 2×2 averaging; in continuous coordinates x becomes x / 2 exactly. */
export function halve(g: Gray): Gray {
  const w = Math.max(1, g.width >> 1), h = Math.max(1, g.height >> 1);
  const out = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    const r0 = 2 * y * g.width, r1 = Math.min(2 * y + 1, g.height - 1) * g.width;
    for (let x = 0; x < w; x++) {
      const x0 = 2 * x, x1 = Math.min(2 * x + 1, g.width - 1);
      out[y * w + x] = (g.data[r0 + x0] + g.data[r0 + x1] + g.data[r1 + x0] + g.data[r1 + x1]) / 4;
    }
  }
  return { data: out, width: w, height: h };
}

/** Bilinear sample at a continuous point; NaN outside the image. */
function sample(g: Gray, x: number, y: number): number {
  const fx = x - 0.5, fy = y - 0.5;
  if (fx < 0 || fy < 0 || fx > g.width - 1 || fy > g.height - 1) return Number.NaN;
  const x0 = Math.min(g.width - 2, Math.floor(fx)), y0 = Math.min(g.height - 2, Math.floor(fy));
  const ax = fx - x0, ay = fy - y0;
  const i = y0 * g.width + x0;
  const d = g.data;
  if (g.width < 2 || g.height < 2) return d[0];
  return (d[i] * (1 - ax) + d[i + 1] * ax) * (1 - ay) + (d[i + g.width] * (1 - ax) + d[i + g.width + 1] * ax) * ay;
}

/** Central-difference gradients (one-sided at the border), per pixel. */
function gradients(g: Gray): { gx: Gray; gy: Gray } {
  const { width: w, height: h, data } = g;
  const gx = new Float32Array(w * h), gy = new Float32Array(w * h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      const l = x > 0 ? data[i - 1] : data[i], r = x < w - 1 ? data[i + 1] : data[i];
      const u = y > 0 ? data[i - w] : data[i], dn = y < h - 1 ? data[i + w] : data[i];
      gx[i] = (r - l) / (x > 0 && x < w - 1 ? 2 : 1);
      gy[i] = (dn - u) / (y > 0 && y < h - 1 ? 2 : 1);
    }
  }
  return { gx: { data: gx, width: w, height: h }, gy: { data: gy, width: w, height: h } };
}

/** Solves the 4×4 system H·x = b by Gaussian elimination with partial pivoting; null when singular. */
function solve4(H: number[][], b: number[]): number[] | null {
  const a = H.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < 4; c++) {
    let p = c;
    for (let r = c + 1; r < 4; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    if (Math.abs(a[p][c]) < 1e-12) return null;
    [a[c], a[p]] = [a[p], a[c]];
    for (let r = 0; r < 4; r++) {
      if (r === c) continue;
      const f = a[r][c] / a[c][c];
      for (let k = c; k < 5; k++) a[r][k] -= f * a[c][k];
    }
  }
  return a.map((row, i) => row[4] / a[i][i]);
}

export interface EccOptions {
  /** Pyramid levels below full size (each halves both images). Default: as many as keep the region ≥ 48 px. */
  levels?: number;
  /** Iterations per level, coarsest first; the last entry repeats. */
  iterations?: number[];
  /** Stop a level when the update moves the region's corners less than this (level pixels). */
  epsilon?: number;
  /** Use every n-th template pixel of the region at full size (speed). Default 1. */
  step?: number;
}

export interface EccResult {
  /** Template coordinates → image coordinates. */
  transform: Similarity;
  /** Correlation coefficient over the region at full size, −1…1 (1: identical up to gain and offset). */
  rho: number;
  /** Share of region pixels that fell inside the image at the end. */
  coverage: number;
}

type Params = [number, number, number, number]; // x' = a·x − b·y + tx, y' = b·x + a·y + ty

const toParams = (t: Similarity): Params => [t.scale * Math.cos(t.angle), t.scale * Math.sin(t.angle), t.translation[0], t.translation[1]];
const fromParams = (p: Params): Similarity => ({ scale: Math.hypot(p[0], p[1]), angle: Math.atan2(p[1], p[0]), translation: [p[2], p[3]] });

/** The region's pixel centres (every `step`-th), continuous coordinates. */
function regionPoints(t: Gray, r: Rect, step: number): { xs: Float64Array; ys: Float64Array; vals: Float64Array } {
  const x0 = Math.max(0, Math.floor(r.x)), y0 = Math.max(0, Math.floor(r.y));
  const x1 = Math.min(t.width, Math.ceil(r.x + r.width)), y1 = Math.min(t.height, Math.ceil(r.y + r.height));
  const xs: number[] = [], ys: number[] = [], vals: number[] = [];
  for (let y = y0; y < y1; y += step) {
    for (let x = x0; x < x1; x += step) {
      xs.push(x + 0.5);
      ys.push(y + 0.5);
      vals.push(t.data[y * t.width + x]);
    }
  }
  return { xs: Float64Array.from(xs), ys: Float64Array.from(ys), vals: Float64Array.from(vals) };
}

/** One pyramid level of ECC (forward-additive Gauss–Newton on the similarity parameters, as in the paper). */
function eccLevel(template: Gray, region: Rect, image: Gray, p: Params, iterations: number, epsilon: number, step: number): { p: Params; rho: number; coverage: number } {
  const { gx, gy } = gradients(image);
  const pts = regionPoints(template, region, step);
  const n = pts.xs.length;
  const iw = new Float64Array(n), jx = new Float64Array(n), jy = new Float64Array(n);
  const valid = new Uint8Array(n);
  let rho = -1, coverage = 0;
  const size = Math.max(region.width, region.height);
  for (let it = 0; it <= iterations; it++) {
    // Warp the image and its gradients onto the region's points.
    let m = 0, tm = 0, count = 0;
    for (let k = 0; k < n; k++) {
      const x = pts.xs[k], y = pts.ys[k];
      const X = p[0] * x - p[1] * y + p[2], Y = p[1] * x + p[0] * y + p[3];
      const v = sample(image, X, Y);
      if (Number.isNaN(v)) {
        valid[k] = 0;
        continue;
      }
      valid[k] = 1;
      iw[k] = v;
      jx[k] = sample(gx, X, Y);
      jy[k] = sample(gy, X, Y);
      m += v;
      tm += pts.vals[k];
      count++;
    }
    coverage = n ? count / n : 0;
    if (count < 16) return { p, rho: -1, coverage };
    m /= count;
    tm /= count;
    // Zero-mean template and warped image, their norms and the Jacobian projections.
    let tt = 0, ii = 0, ti = 0;
    const H = [[0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0]];
    const gi = [0, 0, 0, 0], gt = [0, 0, 0, 0];
    for (let k = 0; k < n; k++) {
      if (!valid[k]) continue;
      const x = pts.xs[k], y = pts.ys[k];
      const t = pts.vals[k] - tm, v = iw[k] - m;
      tt += t * t; ii += v * v; ti += t * v;
      const Gx = jx[k], Gy = jy[k];
      const J = [Gx * x + Gy * y, -Gx * y + Gy * x, Gx, Gy];
      for (let r = 0; r < 4; r++) {
        gi[r] += J[r] * v;
        gt[r] += J[r] * t;
        for (let c = r; c < 4; c++) H[r][c] += J[r] * J[c];
      }
    }
    for (let r = 0; r < 4; r++) for (let c = 0; c < r; c++) H[r][c] = H[c][r];
    rho = tt > 0 && ii > 0 ? ti / Math.sqrt(tt * ii) : -1;
    if (it === iterations) break;
    const hGi = solve4(H, gi);
    if (!hGi) break;
    const lambdaN = ii - gi.reduce((s, g, r) => s + g * hGi[r], 0);
    const lambdaD = ti - gt.reduce((s, g, r) => s + g * hGi[r], 0);
    if (!(lambdaD > 0)) break;
    const lambda = lambdaN / lambdaD;
    // Update: Δp = H⁻¹·Jᵀ·(λ·t − v).
    const ge = [0, 0, 0, 0];
    for (let r = 0; r < 4; r++) ge[r] = lambda * gt[r] - gi[r];
    const dp = solve4(H, ge);
    if (!dp) break;
    p = [p[0] + dp[0], p[1] + dp[1], p[2] + dp[2], p[3] + dp[3]];
    // How far the update moves the region's far corner: a scale-free stopping rule.
    const moved = Math.hypot(dp[0] * size, dp[1] * size) + Math.hypot(dp[2], dp[3]);
    if (moved < epsilon) {
      it = iterations - 1;
    }
  }
  return { p, rho, coverage };
}

/**
 * Refines `init` (template coordinates → image coordinates) so that the image, warped back, best matches the
 * template over `region` (template pixels) in the ECC sense. Coarse levels find the basin, the full-size level the
 * sub-pixel fit.
 */
export function eccSimilarity(template: Gray, region: Rect, image: Gray, init: Similarity, opts: EccOptions = {}): EccResult {
  const minSide = Math.min(region.width, region.height);
  const levels = opts.levels ?? Math.max(0, Math.min(4, Math.floor(Math.log2(Math.max(1, minSide / 48)))));
  const iterations = opts.iterations ?? [40, 30, 20, 12, 8];
  const epsilon = opts.epsilon ?? 0.01;
  const tp: Gray[] = [template], ip: Gray[] = [image];
  for (let l = 0; l < levels; l++) {
    tp.push(halve(tp[l]));
    ip.push(halve(ip[l]));
  }
  let p = toParams(init);
  let last = { rho: -1, coverage: 0 };
  for (let l = levels; l >= 0; l--) {
    const f = 2 ** l;
    // Same scale and rotation at every level; translations shrink with the pixels.
    const pl: Params = [p[0], p[1], p[2] / f, p[3] / f];
    const r: Rect = { x: region.x / f, y: region.y / f, width: region.width / f, height: region.height / f };
    const step = l === 0 ? opts.step ?? 1 : 1;
    const its = iterations[Math.min(levels - l, iterations.length - 1)];
    const out = eccLevel(tp[l], r, ip[l], pl, its, epsilon, step);
    p = [out.p[0], out.p[1], out.p[2] * f, out.p[3] * f];
    last = out;
  }
  return { transform: fromParams(p), rho: last.rho, coverage: last.coverage };
}
