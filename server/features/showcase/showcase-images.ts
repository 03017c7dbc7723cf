import { createRequire } from 'node:module';
import sharp, { type OverlayOptions } from 'sharp';
import type { Photo } from '../../entities/photo.js';
import { boxIsLipsOnly, lipsOnlyCropBox, mapPoints } from '../../media/showcase-crop.js';
import type { ObjectStore } from '../../storage/object-store.js';
import { badRequest } from '../../lib/errors.js';

const require = createRequire(import.meta.url);
/** A font shipped with the app (npm), so captions look the same on every server. */
const FONT_FILE = require.resolve('@expo-google-fonts/noto-sans/500Medium/NotoSans_500Medium.ttf');

const PANEL_HEIGHT = 900;

/** The photo as the showcase uses it: the aligned frame when there is one, else the display copy. */
async function sourceImage(storage: ObjectStore, photo: Photo): Promise<{ buffer: Buffer; toFrame: [[number, number, number], [number, number, number]] | null }> {
  const aligned = photo.alignment ? photo.variants.find((v) => v.variant === 'aligned' && v.format === 'jpeg') ?? photo.variants.find((v) => v.variant === 'aligned') : undefined;
  if (aligned && photo.alignment) return { buffer: await storage.get(aligned.key), toFrame: photo.alignment.matrix };
  const display = photo.variants.find((v) => v.variant === 'display' && v.format === 'jpeg') ?? photo.variants.find((v) => v.variant === 'display');
  if (!display) throw badRequest('A photo has no display copy to export.');
  return { buffer: await storage.get(display.key), toFrame: null };
}

/** One panel: cropped to the lips when the consent says so, scaled to a common height. */
export async function renderPanel(storage: ObjectStore, photo: Photo, crop: 'face' | 'lips-only'): Promise<Buffer> {
  const { buffer, toFrame } = await sourceImage(storage, photo);
  let img = sharp(buffer);
  if (crop === 'lips-only') {
    const points = photo.landmarks?.points;
    if (!points) throw badRequest('The consent allows only a lips-only crop, and a photo has no landmarks to find the lips. Place its landmarks first.', { photoId: photo.id }, 'NEEDS_LANDMARKS');
    const meta = await sharp(buffer).metadata();
    const asXY = points.map((p) => (p ? { x: p[0], y: p[1] } : null));
    const framePoints = toFrame ? mapPoints(asXY, toFrame) : asXY;
    const box = lipsOnlyCropBox(framePoints, { width: meta.width!, height: meta.height! });
    if (!box || !boxIsLipsOnly(box, framePoints)) {
      throw badRequest('The lips could not be cropped apart from the eyes and nose on a photo. Check its landmarks.', { photoId: photo.id }, 'CROP_FAILED');
    }
    img = sharp(await img.extract(box).toBuffer());
  }
  return img.resize({ height: PANEL_HEIGHT }).jpeg({ quality: 92 }).toBuffer();
}

async function textImage(text: string, sizePx: number, colour: string): Promise<Buffer> {
  const escaped = text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
  return sharp({ text: { text: `<span foreground="${colour}">${escaped}</span>`, fontfile: FONT_FILE, font: `Noto Sans Medium ${sizePx}`, dpi: 72, rgba: true } }).png().toBuffer();
}

/**
 * Lays panels side by side on a neutral grey band with labels, the caption and the clinic's watermark.
 * Output is a JPEG with no metadata at all (sharp writes none unless asked).
 */
export async function composeExport(panels: Buffer[], labels: string[], caption: string, watermark: string): Promise<Buffer> {
  const metas = await Promise.all(panels.map((p) => sharp(p).metadata()));
  const gap = 12;
  const band = 64;
  const width = metas.reduce((n, m) => n + m.width!, 0) + gap * (panels.length + 1);
  const height = PANEL_HEIGHT + gap * 2 + band;
  const layers: OverlayOptions[] = [];
  let x = gap;
  for (const [i, p] of panels.entries()) {
    layers.push({ input: p, left: x, top: gap });
    if (labels[i]) layers.push({ input: await textImage(labels[i], 26, '#ffffff'), left: x + 14, top: gap + 12 });
    x += metas[i].width! + gap;
  }
  const cap = await textImage(caption, 24, '#f2f2f2');
  const mark = await textImage(watermark, 24, '#d8d8d8');
  const capMeta = await sharp(cap).metadata();
  const markMeta = await sharp(mark).metadata();
  layers.push({ input: cap, left: gap + 4, top: PANEL_HEIGHT + gap * 2 + Math.round((band - capMeta.height!) / 2) });
  layers.push({ input: mark, left: Math.max(gap, width - gap - markMeta.width! - 4), top: PANEL_HEIGHT + gap * 2 + Math.round((band - markMeta.height!) / 2) });
  return sharp({ create: { width, height, channels: 3, background: '#5a5a5a' } })
    .composite(layers)
    .jpeg({ quality: 90 })
    .toBuffer();
}
