import sharp, { type Metadata, type Sharp } from 'sharp';
import { MAX_INPUT_PIXELS } from '../features/photos/photos.schemas.js';
import { HttpError } from '../lib/errors.js';

/** Formats accepted as photos. SVG, GIF, PDF and the rest are refused even when libvips could read them. */
const ACCEPTED_FORMATS = new Set(['jpeg', 'png', 'webp', 'tiff', 'heif']);

export interface ImageHeader {
  format: string;
  /** Stored size, before orientation is applied. */
  width: number;
  height: number;
}

const unreadable = (detail?: string) =>
  new HttpError(415, 'NOT_AN_IMAGE', 'This file is not a photo Twinframe can read. Use a JPEG, PNG, WebP, TIFF or AVIF image.', detail ? { reason: detail } : undefined);

/**
 * Reads only the file header: proves the bytes start like an image of an accepted format and refuses a
 * decompression bomb by its declared pixel count before any pixel is decoded.
 */
export async function inspectHeader(bytes: Buffer): Promise<ImageHeader> {
  if (bytes.length === 0) throw new HttpError(400, 'EMPTY_FILE', 'The file is empty (0 bytes). Choose the photo again.');
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata();
  } catch (err) {
    throw unreadable((err as Error).message);
  }
  if (!meta.format || !ACCEPTED_FORMATS.has(meta.format) || !meta.width || !meta.height) throw unreadable(meta.format ? `format ${meta.format}` : undefined);
  if (meta.format === 'heif' && meta.compression === 'hevc') {
    throw new HttpError(
      415,
      'HEIC_NOT_SUPPORTED',
      'HEIC photos cannot be read here. Set the camera to save JPEG ("most compatible"), or export the photo as JPEG, and upload it again.',
    );
  }
  if (meta.width * meta.height > MAX_INPUT_PIXELS) {
    throw new HttpError(
      422,
      'TOO_MANY_PIXELS',
      `The image is ${meta.width} × ${meta.height} pixels; the limit is ${MAX_INPUT_PIXELS / 1e6} megapixels. Upload a smaller image.`,
      { width: meta.width, height: meta.height, maxPixels: MAX_INPUT_PIXELS },
    );
  }
  return { format: meta.format, width: meta.width, height: meta.height };
}

/**
 * The one decode pipeline of the app: fails on corrupt or truncated data, keeps the pixel limit, turns the
 * pixels upright by their EXIF orientation, flattens any transparency, and converts colour to sRGB through the
 * embedded ICC profile. Nothing of the input's metadata survives to an output (sharp writes none unless asked).
 */
export function decodePipeline(bytes: Buffer): Sharp {
  return sharp(bytes, { failOn: 'error', limitInputPixels: MAX_INPUT_PIXELS, sequentialRead: true })
    .rotate()
    .flatten({ background: '#ffffff' })
    .toColourspace('srgb');
}

/** Upright sRGB pixels, 8 bits per channel, 3 channels: the single decode every variant is made from. */
export interface DecodedImage {
  data: Buffer;
  width: number;
  height: number;
  channels: 3;
}

/** Decodes once to raw pixels; decoding errors become a clear 422. */
export async function decodeUpright(bytes: Buffer): Promise<DecodedImage> {
  try {
    const { data, info } = await decodePipeline(bytes).raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true });
    if (info.channels !== 3) throw new Error(`unexpected ${info.channels} channels after decoding`);
    return { data, width: info.width, height: info.height, channels: 3 };
  } catch (err) {
    throw new HttpError(422, 'IMAGE_DAMAGED', 'The image is damaged or incomplete and cannot be stored. Take or export the photo again.', {
      reason: (err as Error).message,
    });
  }
}
