/**
 * Least-squares similarity transform between two 2-D point sets (Umeyama, IEEE TPAMI 13(4):376–380, 1991).
 *
 * Umeyama's method: centre both sets, Σ = (1/n)·Σ (y_i − μ_y)(x_i − μ_x)ᵀ, SVD Σ = U·D·Vᵀ, S = diag(1, −1) when
 * det(U)·det(V) < 0, R = U·S·Vᵀ, c = tr(D·S)/σ²_x, t = μ_y − c·R·μ_x.
 *
 * In two dimensions that SVD has a closed form, used here so the result is exact and branch-free: write
 * Σ = [[a, b], [e, d]] as the sum of a rotation-scale part p = ((a+d)/2, (e−b)/2) and a reflection-scale part
 * q = ((a−d)/2, (b+e)/2). The singular values are |p|+|q| and ||p|−|q||, and det Σ = |p|² − |q|², so in both cases
 * of Umeyama's sign rule tr(D·S) = 2|p| and the rotation is the angle of p. The tests check this against a
 * general-purpose SVD.
 */

/** A point in pixels, `[x, y]`, x to the right and y down. */
export type Point = readonly [number, number];

/** y ≈ scale · R(angle) · x + translation; R(θ) = [[cos θ, −sin θ], [sin θ, cos θ]] acting on column vectors. */
export interface Similarity {
  scale: number;
  /** Radians; in image coordinates (y down) a positive angle turns clockwise on screen. */
  angle: number;
  translation: Point;
}

/** Row-major 2×3 affine matrix `[[m00, m01, tx], [m10, m11, ty]]`, as stored on a photo. */
export type AffineMatrix = [[number, number, number], [number, number, number]];

export class DegenerateTransformError extends Error {}

/**
 * The similarity transform minimising Σ‖y_i − (c·R·x_i + t)‖² over scale c > 0, proper rotations R (never a
 * reflection) and translations t. Needs at least two source points that do not coincide.
 */
export function umeyama(src: readonly Point[], dst: readonly Point[]): Similarity {
  const n = src.length;
  if (n !== dst.length) throw new DegenerateTransformError('The two point sets differ in size.');
  if (n < 2) throw new DegenerateTransformError('At least two points are needed.');
  for (const p of [...src, ...dst]) {
    if (!Number.isFinite(p[0]) || !Number.isFinite(p[1])) throw new DegenerateTransformError('A point is not a finite number.');
  }

  let mxx = 0, mxy = 0, myx = 0, myy = 0;
  for (let i = 0; i < n; i++) {
    mxx += src[i][0]; mxy += src[i][1];
    myx += dst[i][0]; myy += dst[i][1];
  }
  mxx /= n; mxy /= n; myx /= n; myy /= n;

  let a = 0, b = 0, e = 0, d = 0, varX = 0;
  for (let i = 0; i < n; i++) {
    const x0 = src[i][0] - mxx, x1 = src[i][1] - mxy;
    const y0 = dst[i][0] - myx, y1 = dst[i][1] - myy;
    a += y0 * x0; b += y0 * x1;
    e += y1 * x0; d += y1 * x1;
    varX += x0 * x0 + x1 * x1;
  }
  a /= n; b /= n; e /= n; d /= n; varX /= n;

  const pc = a + d;
  const ps = e - b;
  const trDS = Math.hypot(pc, ps);
  // Relative tolerance: source points that (nearly) coincide give no direction to rotate or scale by.
  const size = Math.max(1, Math.abs(mxx), Math.abs(mxy));
  if (varX <= (1e-12 * size) ** 2) throw new DegenerateTransformError('The source points coincide.');
  if (trDS <= 1e-12 * varX) throw new DegenerateTransformError('The target points coincide or give no rotation.');

  const angle = Math.atan2(ps, pc);
  const scale = trDS / varX;
  const cos = Math.cos(angle), sin = Math.sin(angle);
  const translation: Point = [myx - scale * (cos * mxx - sin * mxy), myy - scale * (sin * mxx + cos * mxy)];
  return { scale, angle, translation };
}

/** The 2×2 rotation matrix of a similarity (column-vector convention). */
export function rotationMatrix(t: Similarity): [[number, number], [number, number]] {
  const cos = Math.cos(t.angle), sin = Math.sin(t.angle);
  return [[cos, -sin], [sin, cos]];
}

export function toAffine(t: Similarity): AffineMatrix {
  const [[r00, r01], [r10, r11]] = rotationMatrix(t);
  return [
    [t.scale * r00, t.scale * r01, t.translation[0]],
    [t.scale * r10, t.scale * r11, t.translation[1]],
  ];
}

export function applyAffine(m: AffineMatrix, p: Point): Point {
  return [m[0][0] * p[0] + m[0][1] * p[1] + m[0][2], m[1][0] * p[0] + m[1][1] * p[1] + m[1][2]];
}

export function applySimilarity(t: Similarity, p: Point): Point {
  return applyAffine(toAffine(t), p);
}

export function invertSimilarity(t: Similarity): Similarity {
  const scale = 1 / t.scale;
  const angle = -t.angle;
  const cos = Math.cos(angle), sin = Math.sin(angle);
  const [tx, ty] = t.translation;
  return { scale, angle, translation: [-scale * (cos * tx - sin * ty), -scale * (sin * tx + cos * ty)] };
}

/** Root-mean-square distance between the mapped source points and the targets, in target pixels. */
export function residualRms(t: Similarity, src: readonly Point[], dst: readonly Point[]): number {
  const m = toAffine(t);
  let s = 0;
  for (let i = 0; i < src.length; i++) {
    const q = applyAffine(m, src[i]);
    s += (q[0] - dst[i][0]) ** 2 + (q[1] - dst[i][1]) ** 2;
  }
  return Math.sqrt(s / src.length);
}
