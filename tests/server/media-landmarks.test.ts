import fs from 'node:fs';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { checkLandmarks } from '../../server/media/landmark-input.js';
import { detectAllLandmarks, detectLandmarks, type LandmarkDetection } from '../../server/media/landmarks.js';
import { eyeCentres } from '../../server/media/measurements.js';
import { VIEWS } from '../../server/media/views.js';
import { renderSyntheticFace } from '../fixtures/synthetic-face.js';

/** The NASA astronaut portrait (public domain), shipped by Debian's python3-skimage (installed by .ci/run). */
const ASTRONAUT = '/usr/lib/python3/dist-packages/skimage/data/astronaut.png';

describe('automatic landmarks (real model)', () => {
  let faces: LandmarkDetection[];
  beforeAll(async () => {
    faces = await detectAllLandmarks(fs.readFileSync(ASTRONAUT));
  }, 60_000);

  it('finds exactly one face in the astronaut portrait, with 68 points inside its box', () => {
    expect(faces).toHaveLength(1);
    const [{ points, box, score }] = faces;
    expect(score).toBeGreaterThan(0.5);
    expect(points).toHaveLength(68);
    for (const [x, y] of points) {
      expect(x).toBeGreaterThanOrEqual(box.x);
      expect(x).toBeLessThanOrEqual(box.x + box.width);
      expect(y).toBeGreaterThanOrEqual(box.y);
      expect(y).toBeLessThanOrEqual(box.y + box.height);
    }
  });

  it('places the eye centres above the mouth and the lip points in the order of the 68-point markup (FACTS 5)', () => {
    const p = faces[0].points;
    const eyes = eyeCentres(p)!;
    const lipTop = Math.min(...p.slice(48, 68).map((q) => q[1]));
    expect(eyes.right[1]).toBeLessThan(lipTop);
    expect(eyes.left[1]).toBeLessThan(lipTop);
    // iBUG 300-W: the subject's right eye (36–41) is on the image's left in a frontal photo.
    expect(eyes.right[0]).toBeLessThan(eyes.left[0]);
    // Outer lip: 48 (right corner) → 49…53 along the upper edge → 54 (left corner) → 55…59 back along the lower edge.
    for (let i = 48; i < 54; i++) expect(p[i + 1][0]).toBeGreaterThan(p[i][0]);
    for (let i = 54; i < 59; i++) expect(p[i + 1][0]).toBeLessThan(p[i][0]);
    expect(p[48][0]).toBeLessThan(p[59][0]);
    // Inner lip: 60 → 61…63 → 64 left to right along the upper edge, 65…67 back along the lower edge.
    for (let i = 60; i < 64; i++) expect(p[i + 1][0]).toBeGreaterThan(p[i][0]);
    for (let i = 64; i < 67; i++) expect(p[i + 1][0]).toBeLessThan(p[i][0]);
    // Upper midpoint 51 above the inner midpoints 62 and 66, which lie above the lower midpoint 57.
    expect(p[51][1]).toBeLessThan(p[62][1]);
    expect(p[62][1]).toBeLessThanOrEqual(p[66][1]);
    expect(p[66][1]).toBeLessThan(p[57][1]);
    // Inner corners lie between the outer ones.
    expect(p[60][0]).toBeGreaterThanOrEqual(p[48][0]);
    expect(p[64][0]).toBeLessThanOrEqual(p[54][0]);
  });

  it('reports points in the input image coordinates when it works on a shrunken copy', async () => {
    const face = await renderSyntheticFace({ width: 1638, height: 2048, format: 'jpeg' });
    const found = await detectLandmarks(face.data);
    expect(found).not.toBeNull();
    const eyes = eyeCentres(found!.points)!;
    // Within about 5 % of the drawn interpupillary distance (160 px) of the drawn eye centres.
    expect(Math.hypot(eyes.right[0] - face.anchors.rightEyeCentre[0], eyes.right[1] - face.anchors.rightEyeCentre[1])).toBeLessThan(16);
    expect(Math.hypot(eyes.left[0] - face.anchors.leftEyeCentre[0], eyes.left[1] - face.anchors.leftEyeCentre[1])).toBeLessThan(16);
  });

  it('returns null, not an error, when there is no face', async () => {
    const wall = await sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 200, g: 190, b: 180 } } }).jpeg().toBuffer();
    expect(await detectLandmarks(wall)).toBeNull();
  });
});

describe('landmark input check (used by the routes)', () => {
  const image = { width: 800, height: 1000 };
  const frontal = VIEWS['frontal-rest'];
  const good = (): [number, number][] => Array.from({ length: 68 }, (_, i) => [100 + i * 5, 200 + (i % 10) * 20] as [number, number]);

  it('accepts a full set and reads the view anchors from it', () => {
    const res = checkLandmarks({ points: good() }, image, frontal);
    expect(res.ok).toBe(true);
    if (res.ok) expect(res.value.anchors).toHaveLength(2);
  });

  it.each([
    ['a point outside the image', { points: good().map((p, i) => (i === 10 ? [801, 10] : p)) }, 'points.10'],
    ['a negative coordinate', { points: good().map((p, i) => (i === 3 ? [-1, 10] : p)) }, 'points.3'],
    ['NaN', { points: good().map((p, i) => (i === 20 ? [Number.NaN, 10] : p)) }, 'points.20'],
    ['Infinity', { anchors: [[10, 10], [Number.POSITIVE_INFINITY, 10]] }, 'anchors.1'],
    ['the wrong point count', { points: good().slice(0, 67) }, 'points'],
    ['the wrong anchor count', { anchors: [[10, 10]] }, 'anchors'],
    ['coinciding anchors', { anchors: [[300, 400], [301, 401]] }, 'anchors'],
    ['eye points collapsed onto one spot', { points: good().map((p, i) => (i >= 36 && i < 48 ? [400, 400] : p)) }, 'anchors'],
    ['a ruler of zero length', { anchors: [[300, 400], [500, 400]], ruler: { a: [10, 10], b: [200, 10], lengthMm: 0 } }, 'ruler.lengthMm'],
    ['nothing at all', {}, ''],
  ] as [string, Parameters<typeof checkLandmarks>[0], string][])('rejects %s', (_what, input, path) => {
    const res = checkLandmarks(input, image, frontal);
    expect(res.ok).toBe(false);
    if (!res.ok) expect(res.issues.map((i) => i.path.join('.'))).toContain(path);
  });

  it("takes three anchors for a profile view and two for the others", () => {
    expect(checkLandmarks({ anchors: [[600, 500], [450, 650], [600, 900]] }, image, VIEWS['lateral-left']).ok).toBe(true);
    expect(checkLandmarks({ anchors: [[600, 500], [450, 650]] }, image, VIEWS['lateral-left']).ok).toBe(false);
    expect(checkLandmarks({ anchors: [[300, 700], [480, 700]] }, image, VIEWS['lips-rest']).ok).toBe(true);
  });
});
