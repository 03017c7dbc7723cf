import sharp from 'sharp';
import { ssim } from 'ssim.js';
import { describe, expect, it } from 'vitest';
import { alignPhoto, renderAligned, viewTransform } from '../../server/media/align.js';
import { applySimilarity, type Point, umeyama } from '../../server/media/umeyama.js';
import { frameAnchors, REFERENCE_FACE_68, VIEWS } from '../../server/media/views.js';
import { dlibFaces, dlibFacesDir } from '../helpers/reference-photos.js';
import { renderSyntheticFace } from '../fixtures/synthetic-face.js';

async function rgba(buf: Buffer) {
  const { data, info } = await sharp(buf).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return { data: new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

/** Mean SSIM (Wang, Bovik, Sheikh, Simoncelli, IEEE TIP 13:600–612, 2004) through ssim.js, its reference port (FACTS 2). */
async function meanSsim(a: Buffer, b: Buffer) {
  return ssim(await rgba(a), await rgba(b)).mssim;
}

describe('alignment', () => {
  it('lines up a face drawn rotated, scaled and moved with the original, pixel for pixel (SSIM, FACTS 2)', async () => {
    const view = VIEWS['frontal-rest'];
    const original = await renderSyntheticFace();
    // The same face drawn through a known similarity by the SVG renderer: 14° clockwise, ×0.8, moved.
    const warped = await renderSyntheticFace({ transform: { scale: 0.8, angleDeg: 14, translate: [190, -20] } });
    const anchorsOf = (f: typeof original): Point[] => [f.anchors.rightEyeCentre, f.anchors.leftEyeCentre];

    const fit = (f: typeof original) => viewTransform({ src: anchorsOf(f), dst: frameAnchors(view), from: 'anchors' });
    const fa = fit(original), fb = fit(warped);
    const a = await alignPhoto(original.data, view, fa.transform, fa.residual);
    const b = await alignPhoto(warped.data, view, fb.transform, fb.residual);
    expect([a.width, a.height]).toEqual([view.frame.width, view.frame.height]);
    expect(b.transform.scale / a.transform.scale).toBeCloseTo(1 / 0.8, 9);
    expect(((b.transform.angle - a.transform.angle) * 180) / Math.PI).toBeCloseTo(-14, 9);

    const aligned = await meanSsim(a.data, b.data);
    const unaligned = await meanSsim(original.data, warped.data);
    expect(aligned).toBeGreaterThanOrEqual(0.9);
    expect(unaligned).toBeLessThan(aligned - 0.15);
  });

  it('puts a photo point exactly where the transform sends it (blob centroid, random transforms)', async () => {
    // A Gaussian blob centred at a known sub-pixel point; its centroid after resampling must land on the mapped point.
    const W = 640, H = 480, cx = 250.3, cy = 190.7;
    const raw = Buffer.alloc(W * H * 3);
    for (let y = 0; y < H; y++) {
      for (let x = 0; x < W; x++) {
        const v = Math.round(255 * Math.exp(-((x + 0.5 - cx) ** 2 + (y + 0.5 - cy) ** 2) / 72));
        raw.fill(v, (y * W + x) * 3, (y * W + x) * 3 + 3);
      }
    }
    const img = await sharp(raw, { raw: { width: W, height: H, channels: 3 } }).png().toBuffer();
    let s = 11;
    const r = () => ((s = (s * 1664525 + 1013904223) >>> 0) / 2 ** 32);
    for (let k = 0; k < 12; k++) {
      const scale = 0.35 + r() * 2.2, angle = (r() * 2 - 1) * Math.PI;
      const target: Point = [120 + r() * 360, 120 + r() * 460];
      const c = Math.cos(angle), sn = Math.sin(angle);
      const t = { scale, angle, translation: [target[0] - scale * (c * cx - sn * cy), target[1] - scale * (sn * cx + c * cy)] as Point };
      const out = await renderAligned(img, t, { width: 600, height: 700 }, { formats: ['webp'], quality: 100 });
      const { data, info } = await sharp(out.data).raw().toBuffer({ resolveWithObject: true });
      let sx = 0, sy = 0, sw = 0;
      for (let y = 0; y < info.height; y++) {
        for (let x = 0; x < info.width; x++) {
          const v = Math.max(0, data[(y * info.width + x) * info.channels] - 140);
          sx += v * (x + 0.5); sy += v * (y + 0.5); sw += v;
        }
      }
      expect(Math.hypot(sx / sw - target[0], sy / sw - target[1])).toBeLessThan(0.1);
    }
  });

  it('fills the frame beyond the photo with neutral grey and encodes JPEG or WebP', async () => {
    const face = await renderSyntheticFace();
    const t = { scale: 0.2, angle: 0, translation: [0, 0] as Point };
    const out = await renderAligned(face.data, t, { width: 400, height: 300 }, { formats: ['webp'] });
    const meta = await sharp(out.data).metadata();
    expect(meta.format).toBe('webp');
    expect([meta.width, meta.height]).toEqual([400, 300]);
    const { data, info } = await sharp(out.data).raw().toBuffer({ resolveWithObject: true });
    const at = (x: number, y: number) => data[(y * info.width + x) * info.channels];
    expect(Math.abs(at(390, 290) - 128)).toBeLessThan(4);
    expect(Math.abs(at(80, 100) - 128)).toBeGreaterThan(10);
    const jpeg = await renderAligned(face.data, { scale: 1, angle: 0, translation: [5000, 0] }, { width: 64, height: 48 });
    expect((await sharp(jpeg.data).metadata()).format).toBe('jpeg');
  });
});

describe('the reference face of the frontal frame', () => {
  const dir = dlibFacesDir();
  it.skipIf(!dir && !process.env.CI)("is the Procrustes mean of dlib's example 68-point shapes, symmetric, eyes on the frontal anchors", () => {
    const shapes = dlibFaces(dir!).map((f) => f.points);
    const centred = (ps: readonly Point[]): Point[] => {
      const c = ps.reduce((s, p) => [s[0] + p[0] / ps.length, s[1] + p[1] / ps.length], [0, 0]);
      const d = ps.map((p) => [p[0] - c[0], p[1] - c[1]] as Point);
      const n = Math.sqrt(d.reduce((s, p) => s + p[0] ** 2 + p[1] ** 2, 0));
      return d.map((p) => [p[0] / n, p[1] / n] as Point);
    };
    const onto = (ps: readonly Point[], target: readonly Point[]) => ps.map((p) => applySimilarity(umeyama(ps, target), p));
    const average = (sets: Point[][]) => sets[0].map((_, i) => [sets.reduce((s, q) => s + q[i][0], 0) / sets.length, sets.reduce((s, q) => s + q[i][1], 0) / sets.length] as Point);
    // Generalised Procrustes: align every shape to the running mean, average, normalise, repeat.
    let mean = centred(shapes[0]);
    for (let it = 0; it < 10; it++) mean = centred(average(shapes.map((s) => onto(s, mean))));
    // Left–right symmetric: average with the mirrored shape (iBUG 300-W mirror pairs, FACTS 5).
    const mirror = [...Array.from({ length: 17 }, (_, i) => 16 - i), ...Array.from({ length: 10 }, (_, i) => 26 - i), 27, 28, 29, 30, 35, 34, 33, 32, 31,
      45, 44, 43, 42, 47, 46, 39, 38, 37, 36, 41, 40, 54, 53, 52, 51, 50, 49, 48, 59, 58, 57, 56, 55, 64, 63, 62, 61, 60, 67, 66, 65];
    const flipped = mirror.map((i) => [-mean[i][0], mean[i][1]] as Point);
    mean = average([mean, onto(flipped, mean)]);
    const eyes = (ps: readonly Point[]) => [36, 42].map((k) => average(ps.slice(k, k + 6).map((p) => [p]))[0]);
    const placed = mean.map((p) => applySimilarity(umeyama(eyes(mean), frameAnchors(VIEWS['frontal-rest'])), p));
    expect(shapes.length).toBe(43);
    placed.forEach((p, i) => {
      expect(Math.abs(p[0] - REFERENCE_FACE_68[i][0])).toBeLessThan(0.2);
      expect(Math.abs(p[1] - REFERENCE_FACE_68[i][1])).toBeLessThan(0.2);
    });
  });
});
