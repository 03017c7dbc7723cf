import { converter, differenceCiede2000 } from 'culori';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import {
  assessQuality,
  ciede2000,
  exposureClipping,
  laplacianVariance,
  meanLab,
  qualityWarnings,
  skinPatches,
  srgbToLab,
  toGray,
  type Lab,
} from '../../server/media/quality.js';
import { renderSyntheticFace } from '../fixtures/synthetic-face.js';

function rng(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

describe('CIEDE2000', () => {
  // Sharma, Wu & Dalal, "The CIEDE2000 color-difference formula: implementation notes, supplementary test data, and
  // mathematical observations", Color Res. Appl. 30(1):21–30, 2005, test data (FACTS 4).
  const pairs: [Lab, Lab, number][] = [
    [[50, 2.6772, -79.7751], [50, 0, -82.7485], 2.0425],
    [[50, 0, 0], [50, -1, 2], 2.3669],
    [[50, 2.5, 0], [73, 25, -18], 27.1492],
    [[60.2574, -34.0099, 36.2677], [60.4626, -34.1751, 39.4387], 1.2644],
    [[2.0776, 0.0795, -1.135], [0.9033, -0.0636, -0.5514], 0.9082],
  ];
  it.each(pairs)('%j vs %j → %d (Sharma, Wu, Dalal 2005)', (a, b, expected) => {
    expect(Number(ciede2000(a, b).toFixed(4))).toBe(expected);
    expect(Number(ciede2000(b, a).toFixed(4))).toBe(expected);
  });

  it("agrees with culori's implementation on random colours", () => {
    const culoriDe = differenceCiede2000();
    const r = rng(2005);
    for (let i = 0; i < 2000; i++) {
      const a: Lab = [r() * 100, r() * 200 - 100, r() * 200 - 100];
      // Mix far pairs with near ones, where the hue-angle rules matter most.
      const b: Lab = i % 2 ? [r() * 100, r() * 200 - 100, r() * 200 - 100] : [a[0] + r() * 4 - 2, a[1] + r() * 4 - 2, a[2] + r() * 4 - 2];
      const theirs = culoriDe({ mode: 'lab65', l: a[0], a: a[1], b: a[2] }, { mode: 'lab65', l: b[0], a: b[1], b: b[2] });
      expect(ciede2000(a, b)).toBeCloseTo(theirs, 9);
    }
  });

  it("converts sRGB to CIELAB (D65) like culori's lab65", () => {
    const toLab = converter('lab65');
    const r = rng(61966);
    expect(srgbToLab(255, 255, 255)[0]).toBeCloseTo(100, 4);
    expect(srgbToLab(0, 0, 0)[0]).toBeCloseTo(0, 9);
    for (let i = 0; i < 500; i++) {
      const [R, G, B] = [Math.floor(r() * 256), Math.floor(r() * 256), Math.floor(r() * 256)];
      const ours = srgbToLab(R, G, B);
      const theirs = toLab({ mode: 'rgb', r: R / 255, g: G / 255, b: B / 255 });
      // The two use D65 white points rounded differently (XYZ 0.95047/1.08883 vs chromaticity 0.3127/0.3290).
      expect(Math.abs(ours[0] - theirs.l)).toBeLessThan(0.02);
      expect(Math.abs(ours[1] - theirs.a)).toBeLessThan(0.05);
      expect(Math.abs(ours[2] - theirs.b)).toBeLessThan(0.05);
    }
  });
});

describe('variance of the Laplacian', () => {
  it('gives 20/9 for a single 1 in the middle of a 5×5 zero image (FACTS 3, from memory)', () => {
    // Pech-Pacheco et al., ICPR 2000, kernel [[0,1,0],[1,−4,1],[0,1,0]] (FACTS 3; the check value is from memory).
    // By hand over the valid 3×3 region: centre −4, its four neighbours 1, corners 0 → mean 0, variance (16+4)/9.
    const img = new Float32Array(25);
    img[12] = 1;
    expect(laplacianVariance(img, 5, 5)).toBeCloseTo(20 / 9, 12);
  });

  it('is 0 on a flat image and on a linear ramp', () => {
    expect(laplacianVariance(new Float32Array(100).fill(77), 10, 10)).toBe(0);
    const ramp = Float32Array.from({ length: 100 }, (_, i) => (i % 10) * 3 + Math.floor(i / 10) * 2);
    expect(laplacianVariance(ramp, 10, 10)).toBeCloseTo(0, 9);
  });

  it('scores a Gaussian-blurred copy lower than the original (FACTS 3)', async () => {
    const face = await renderSyntheticFace();
    const raw = async (b: Buffer) => {
      const { data, info } = await sharp(b).removeAlpha().raw().toBuffer({ resolveWithObject: true });
      return { data, width: info.width, height: info.height, channels: info.channels };
    };
    const sharpImg = await raw(face.data);
    const blurred = await raw(await sharp(face.data).blur(3).png().toBuffer());
    const region = { x: 200, y: 300, width: 400, height: 500 };
    const a = laplacianVariance(toGray(sharpImg), sharpImg.width, sharpImg.height, region);
    const b = laplacianVariance(toGray(blurred), blurred.width, blurred.height, region);
    expect(b).toBeLessThan(a * 0.5);
    expect(qualityWarnings(assessQuality(blurred, region, null), assessQuality(sharpImg, region, null)).map((w) => w.code)).toContain('blur-partner');
  });
});

describe('exposure and skin colour', () => {
  it('counts clipped highlights and shadows as shares of the region', () => {
    const g = new Float32Array(100).fill(120);
    for (let i = 0; i < 10; i++) g[i] = 255;
    for (let i = 90; i < 95; i++) g[i] = 2;
    expect(exposureClipping(g, 10, 10)).toEqual({ highlights: 0.1, shadows: 0.05 });
    expect(exposureClipping(g, 10, 10, { x: 0, y: 5, width: 10, height: 5 })).toEqual({ highlights: 0, shadows: 0.1 });
  });

  it('reads the mean skin colour from cheek patches chosen by the landmarks and warns on a colour cast', async () => {
    const face = await renderSyntheticFace();
    const decoded = await sharp(face.data).removeAlpha().raw().toBuffer({ resolveWithObject: true });
    const img = { data: decoded.data, width: decoded.info.width, height: decoded.info.height, channels: 3 };
    // Hand-placed 68-point stand-in: only the points the patch uses matter (eyes, nose wings, jaw at nose level).
    const pts = Array.from({ length: 68 }, () => [0, 0] as [number, number]);
    for (let i = 36; i < 42; i++) pts[i] = [320, 440];
    for (let i = 42; i < 48; i++) pts[i] = [480, 440];
    pts[41] = [305, 452]; pts[31] = [383, 585]; pts[2] = [195, 590];
    pts[46] = [495, 452]; pts[35] = [417, 585]; pts[14] = [605, 590];
    const patches = skinPatches(pts)!;
    expect(patches).toHaveLength(2);
    const lab = meanLab(img, patches)!;
    // The patches fall on the skin gradient (#f2caa8 … #c98e6a), never on hair (#3a2618) or lips (#a9424c).
    const skinLight = srgbToLab(0xf2, 0xca, 0xa8), skinDark = srgbToLab(0xc9, 0x8e, 0x6a);
    expect(lab[0]).toBeGreaterThan(skinDark[0] - 1);
    expect(lab[0]).toBeLessThan(skinLight[0] + 1);

    const warm = await sharp(face.data).removeAlpha().linear([1.03, 1, 0.8], [0, 0, 0]).raw().toBuffer();
    const warmQ = assessQuality({ ...img, data: warm }, null, patches);
    const q = assessQuality(img, null, patches);
    expect(qualityWarnings(q, q).map((w) => w.code)).not.toContain('colour-partner');
    expect(qualityWarnings(warmQ, q).map((w) => w.code)).toContain('colour-partner');
  });
});
