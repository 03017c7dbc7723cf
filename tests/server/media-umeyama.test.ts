import { Matrix, SingularValueDecomposition, determinant } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import {
  applySimilarity,
  DegenerateTransformError,
  invertSimilarity,
  rotationMatrix,
  toAffine,
  umeyama,
  type Point,
} from '../../server/media/umeyama.js';

/** A small seeded generator so failures can be replayed. */
function rng(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

/**
 * Umeyama's method written out with a general-purpose SVD (ml-matrix), step by step as in the paper
 * (Umeyama, IEEE TPAMI 13(4):376–380, 1991, eqs. 38–42; FACTS 1), as an independent reference.
 */
function umeyamaBySvd(src: Point[], dst: Point[]) {
  const n = src.length;
  const X = new Matrix(src.map((p) => [...p])).transpose(); // 2×n
  const Y = new Matrix(dst.map((p) => [...p])).transpose();
  const mx = X.mean('row'), my = Y.mean('row');
  const Xc = X.clone().subColumnVector(mx), Yc = Y.clone().subColumnVector(my);
  const sigma = Yc.mmul(Xc.transpose()).div(n);
  const varX = Xc.clone().pow(2).sum() / n;
  const svd = new SingularValueDecomposition(sigma);
  const U = svd.leftSingularVectors, V = svd.rightSingularVectors, d = svd.diagonal;
  const S = Matrix.eye(2);
  if (determinant(U) * determinant(V) < 0) S.set(1, 1, -1);
  const R = U.mmul(S).mmul(V.transpose());
  const c = (d[0] * S.get(0, 0) + d[1] * S.get(1, 1)) / varX;
  const t = Matrix.columnVector(my).sub(R.mmul(Matrix.columnVector(mx)).mul(c));
  return { c, R: R.to2DArray(), t: [t.get(0, 0), t.get(1, 0)] };
}

describe('umeyama', () => {
  it("reproduces the paper's worked example (FACTS 1)", () => {
    // Umeyama 1991, worked example: x = (0,0),(1,0),(0,2) → y = (0,0),(−1,0),(0,2);
    // c ≈ 0.721110, R ≈ [[0.83205, 0.55470], [−0.55470, 0.83205]], t ≈ (−0.8, 0.4) (FACTS 1, recomputed there with a general SVD).
    const t = umeyama([[0, 0], [1, 0], [0, 2]], [[0, 0], [-1, 0], [0, 2]]);
    expect(t.scale).toBeCloseTo(0.72111, 5);
    const R = rotationMatrix(t);
    expect(R[0][0]).toBeCloseTo(0.83205, 5);
    expect(R[0][1]).toBeCloseTo(0.5547, 5);
    expect(R[1][0]).toBeCloseTo(-0.5547, 5);
    expect(R[1][1]).toBeCloseTo(0.83205, 5);
    expect(t.translation[0]).toBeCloseTo(-0.8, 6);
    expect(t.translation[1]).toBeCloseTo(0.4, 6);
    // The paper's point: the best proper rotation, not the reflection that would fit these points exactly.
    expect(R[0][0] * R[1][1] - R[0][1] * R[1][0]).toBeCloseTo(1, 12);
  });

  it('recovers a unit square scaled ×2, rotated 90° and moved by (10, 20) exactly (FACTS 1)', () => {
    const square: Point[] = [[0, 0], [1, 0], [1, 1], [0, 1]];
    // By hand: R(90°)·(x, y) = (−y, x); ×2; + (10, 20).
    const moved: Point[] = square.map(([x, y]) => [10 - 2 * y, 20 + 2 * x]);
    const t = umeyama(square, moved);
    expect(t.scale).toBeCloseTo(2, 12);
    expect(t.angle).toBeCloseTo(Math.PI / 2, 12);
    expect(t.translation[0]).toBeCloseTo(10, 12);
    expect(t.translation[1]).toBeCloseTo(20, 12);
    for (let i = 0; i < 4; i++) {
      const p = applySimilarity(t, square[i]);
      expect(p[0]).toBeCloseTo(moved[i][0], 12);
      expect(p[1]).toBeCloseTo(moved[i][1], 12);
    }
  });

  it('never returns a reflection, even for mirrored point sets', () => {
    const r = rng(7);
    for (let k = 0; k < 200; k++) {
      const src: Point[] = Array.from({ length: 3 + Math.floor(r() * 8) }, () => [r() * 100, r() * 100]);
      const mirrored: Point[] = src.map(([x, y]) => [-x + r(), y + r()]);
      const m = toAffine(umeyama(src, mirrored));
      const det = m[0][0] * m[1][1] - m[0][1] * m[1][0];
      expect(det).toBeGreaterThan(0);
      // A rotation matrix: orthonormal with determinant +1 once the scale is divided out.
      const R = rotationMatrix(umeyama(src, mirrored));
      expect(R[0][0] * R[1][1] - R[0][1] * R[1][0]).toBeCloseTo(1, 12);
    }
  });

  it('agrees with the same method computed through ml-matrix SVD on random point sets', () => {
    const r = rng(42);
    for (let k = 0; k < 300; k++) {
      const n = 2 + Math.floor(r() * 30);
      const src: Point[] = Array.from({ length: n }, () => [r() * 2000 - 500, r() * 2000 - 500]);
      // Half the sets come from a similarity plus noise, half are unrelated (including mirror-like ones).
      const truth = { scale: 0.2 + r() * 3, angle: (r() * 2 - 1) * Math.PI, translation: [r() * 400, r() * 400] as Point };
      const dst: Point[] =
        k % 2 === 0
          ? src.map((p) => { const q = applySimilarity(truth, p); return [q[0] + (r() - 0.5) * 20, q[1] + (r() - 0.5) * 20]; })
          : Array.from({ length: n }, () => [r() * 1000, r() * 1000]);
      const ours = umeyama(src, dst);
      const ref = umeyamaBySvd(src, dst);
      const R = rotationMatrix(ours);
      expect(ours.scale).toBeCloseTo(ref.c, 8);
      for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expect(R[i][j]).toBeCloseTo(ref.R[i][j], 8);
      expect(ours.translation[0]).toBeCloseTo(ref.t[0], 6);
      expect(ours.translation[1]).toBeCloseTo(ref.t[1], 6);
    }
  });

  it('maps two anchors exactly onto their targets', () => {
    const t = umeyama([[310.5, 440.2], [483.1, 438.9]], [[450, 620], [750, 620]]);
    const a = applySimilarity(t, [310.5, 440.2]), b = applySimilarity(t, [483.1, 438.9]);
    expect(a[0]).toBeCloseTo(450, 9);
    expect(a[1]).toBeCloseTo(620, 9);
    expect(b[0]).toBeCloseTo(750, 9);
    expect(b[1]).toBeCloseTo(620, 9);
    const back = applySimilarity(invertSimilarity(t), a);
    expect(back[0]).toBeCloseTo(310.5, 9);
    expect(back[1]).toBeCloseTo(440.2, 9);
  });

  it('refuses coinciding or non-finite points', () => {
    expect(() => umeyama([[5, 5], [5, 5]], [[0, 0], [1, 1]])).toThrow(DegenerateTransformError);
    expect(() => umeyama([[0, 0], [1, 1]], [[3, 3], [3, 3]])).toThrow(DegenerateTransformError);
    expect(() => umeyama([[0, 0], [Number.NaN, 1]], [[0, 0], [1, 1]])).toThrow(DegenerateTransformError);
    expect(() => umeyama([[0, 0]], [[0, 0]])).toThrow(DegenerateTransformError);
    expect(() => umeyama([[0, 0], [1, 0]], [[0, 0]])).toThrow(DegenerateTransformError);
  });
});
