import exifr from 'exifr';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeTestApp, signedIn, type Client, type TestApp } from '../helpers/app.js';
import { exiftoolRead, exiftoolWrite, patientWithVisit, upload } from '../helpers/photos.js';

/**
 * EXIF orientation, tag 0x0112, values 1–8 (CIPA DC-008, Exif 2.3x). To show the stored pixels upright:
 * 1 as is; 2 flip horizontally; 3 rotate 180°; 4 flip vertically; 5 transpose; 6 rotate 90° clockwise;
 * 7 transverse; 8 rotate 90° anticlockwise. Values 5–8 swap width and height.
 */
type Raw = { data: Buffer; width: number; height: number };

/** Where the displayed pixel (x, y) comes from in the stored image, per the table above. */
function displayOp(n: number, img: Raw): Raw {
  const swap = n >= 5;
  const W = swap ? img.height : img.width;
  const H = swap ? img.width : img.height;
  const w = img.width;
  const h = img.height;
  const source = (x: number, y: number): [number, number] => {
    switch (n) {
      case 1: return [x, y];
      case 2: return [w - 1 - x, y];
      case 3: return [w - 1 - x, h - 1 - y];
      case 4: return [x, h - 1 - y];
      case 5: return [y, x];
      case 6: return [y, h - 1 - x];
      case 7: return [w - 1 - y, h - 1 - x];
      case 8: return [w - 1 - y, x];
      default: throw new Error(`orientation ${n}`);
    }
  };
  const out = Buffer.alloc(W * H * 3);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const [sx, sy] = source(x, y);
      img.data.copy(out, (y * W + x) * 3, (sy * w + sx) * 3, (sy * w + sx) * 3 + 3);
    }
  }
  return { data: out, width: W, height: H };
}
/** 6 and 8 undo each other; every other operation is its own inverse. */
const inverse = (n: number) => (n === 6 ? 8 : n === 8 ? 6 : n);

// An upright 120 × 80 scene whose content marks its corners: red top-left, green top-right, blue bottom-left,
// yellow bottom-right. Large flat blocks keep JPEG's colour error far below the thresholds used.
const W = 120;
const H = 80;
const QUADRANTS = { topLeft: [230, 20, 20], topRight: [20, 200, 40], bottomLeft: [30, 40, 220], bottomRight: [235, 220, 30] } as const;
function uprightScene(): Raw {
  const data = Buffer.alloc(W * H * 3);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const c = y < H / 2 ? (x < W / 2 ? QUADRANTS.topLeft : QUADRANTS.topRight) : x < W / 2 ? QUADRANTS.bottomLeft : QUADRANTS.bottomRight;
      data.set(c, (y * W + x) * 3);
    }
  }
  return { data, width: W, height: H };
}

async function colourAt(jpeg: Buffer, fx: number, fy: number): Promise<number[]> {
  const { data, info } = await sharp(jpeg).raw().toBuffer({ resolveWithObject: true });
  const x = Math.floor(fx * info.width);
  const y = Math.floor(fy * info.height);
  const i = (y * info.width + x) * info.channels;
  return [data[i], data[i + 1], data[i + 2]];
}
const near = (a: readonly number[], b: readonly number[]) => a.every((v, i) => Math.abs(v - b[i]) <= 24);

let t: TestApp;
let practitioner: Client;
let practitionerId: string;
beforeAll(async () => {
  t = await makeTestApp();
  const s = await signedIn(t, 'practitioner');
  practitioner = s.client;
  practitionerId = s.user.id;
});
afterAll(() => t.close());

describe('EXIF orientation 1–8 (CIPA DC-008 / Exif 2.3x)', () => {
  it('my own orientation table turns each stored fixture back into the upright scene', () => {
    const scene = uprightScene();
    for (let n = 1; n <= 8; n++) {
      const stored = displayOp(inverse(n), scene);
      expect(displayOp(n, stored).data.equals(scene.data), `orientation ${n}`).toBe(true);
    }
  });

  for (let n = 1; n <= 8; n++) {
    it(`orientation ${n}: the stored photo is upright, ${W} × ${H}, every variant`, async () => {
      const stored = displayOp(inverse(n), uprightScene());
      const plain = await sharp(stored.data, { raw: { width: stored.width, height: stored.height, channels: 3 } }).jpeg({ quality: 95 }).toBuffer();
      const fixture = await exiftoolWrite(plain, [`-Orientation#=${n}`]);
      // The fixture really carries the tag, read back by both readers.
      expect((await exiftoolRead(fixture))['IFD0:Orientation']).toBe(n);
      expect(await exifr.orientation(fixture)).toBe(n);

      const { visit } = await patientWithVisit(t, practitioner, practitionerId);
      const res = await upload(practitioner, visit.id, fixture, { view: 'frontal-rest' });
      expect(res.status).toBe(201);
      expect([res.body.width, res.body.height]).toEqual([W, H]);

      for (const v of res.body.variants as { url: string; width: number; height: number; format: string }[]) {
        expect([v.width, v.height], v.url).toEqual([W, H]);
        const file = await practitioner.get(v.url).buffer(true);
        expect(file.status).toBe(200);
        const meta = await sharp(file.body).metadata();
        expect([meta.width, meta.height], v.url).toEqual([W, H]);
        // No orientation left behind for a viewer to apply a second time.
        expect(meta.orientation ?? 1).toBe(1);
        for (const [corner, fx, fy] of [['topLeft', 0.2, 0.2], ['topRight', 0.8, 0.2], ['bottomLeft', 0.2, 0.8], ['bottomRight', 0.8, 0.8]] as const) {
          const got = await colourAt(file.body, fx, fy);
          expect(near(got, QUADRANTS[corner]), `${v.url} ${corner}: ${got}`).toBe(true);
        }
      }
      const row = (await practitioner.get(`/api/photos/${res.body.id}`)).body;
      expect(row.width).toBe(W);
    });
  }
});
