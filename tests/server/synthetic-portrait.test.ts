import exifr from 'exifr';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { PHOTO_PATIENTS } from '../../server/db/seed-photos.js';
import { detectLandmarks } from '../../server/media/landmarks.js';
import { PORTRAIT_VIEWS, renderPortrait } from '../../server/media/synthetic-portrait.js';

/** Pixels drawn in lip colour: red well above green, blue not below green (skin has blue well below green). */
async function lipPixels(jpeg: Buffer): Promise<number> {
  const { data, info } = await sharp(jpeg).raw().toBuffer({ resolveWithObject: true });
  let n = 0;
  for (let i = 0; i < data.length; i += info.channels) {
    const [r, g, b] = [data[i], data[i + 1], data[i + 2]];
    if (r - g > 50 && b >= g - 4) n += 1;
  }
  return n;
}

describe('synthetic demo portraits', () => {
  it('draws every view of the default shot list at its size', async () => {
    for (const view of PORTRAIT_VIEWS) {
      const meta = await sharp(await renderPortrait({ seed: 18, view, lipVolume: 0.4 })).metadata();
      expect([meta.format, meta.width, meta.height], view).toEqual(view.startsWith('lips-') ? ['jpeg', 1600, 1000] : ['jpeg', 800, 1000]);
    }
  });

  it('draws fuller lips as the lip volume grows', async () => {
    const areas = [];
    for (const lipVolume of [0.1, 0.4, 0.7, 1]) areas.push(await lipPixels(await renderPortrait({ seed: 8, view: 'lips-rest', lipVolume })));
    for (let i = 1; i < areas.length; i++) expect(areas[i], `${areas}`).toBeGreaterThan(areas[i - 1] * 1.1);
  });

  it('carries the capture time in EXIF, as a camera would', async () => {
    const jpeg = await renderPortrait({ seed: 3, view: 'frontal-rest', lipVolume: 0.2 }, { capturedAt: '2026-02-03T10:04:00.000Z' });
    const tags = await exifr.parse(jpeg, { reviveValues: false, pick: ['DateTimeOriginal', 'OffsetTimeOriginal'] });
    expect(tags).toMatchObject({ DateTimeOriginal: '2026:02:03 10:04:00', OffsetTimeOriginal: '+00:00' });
  });

  it('is found by the automatic face model in every frontal demo shot', async () => {
    // The demo relies on this (STACK.md pitfall 9): frontal portraits align without hand-placed landmarks.
    for (const { face } of PHOTO_PATIENTS) {
      for (const view of ['frontal-rest', 'frontal-smile'] as const) {
        for (let shot = 0; shot < 5; shot++) {
          const found = await detectLandmarks(await renderPortrait({ seed: face, view, lipVolume: 0.1 + 0.3 * Math.floor(shot / 2), shot }));
          expect(found?.score ?? 0, `face ${face} ${view} shot ${shot}`).toBeGreaterThan(0.5);
          // The mouth corners (points 48 and 54) sit in the lower half of the drawing, either side of its middle.
          const [left, right] = [found!.points[48], found!.points[54]];
          expect(left[0]).toBeLessThan(400);
          expect(right[0]).toBeGreaterThan(400);
          expect(Math.min(left[1], right[1])).toBeGreaterThan(550);
        }
      }
    }
  }, 120_000);
});
