import sharp from 'sharp';
import { badRequest } from '../../lib/errors.js';

const PNG_MAGIC = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
const DATA_URL = /^data:image\/png;base64,([A-Za-z0-9+/]+={0,2})$/;

/** Fewest inked pixels that count as a signature rather than a tap or an empty pad. */
export const MIN_INK_PIXELS = 150;

export interface CheckedSignature {
  /** The bytes the device sent, kept as evidence. */
  original: Buffer;
  /** A plain 8-bit RGBA PNG re-encoded for embedding in the PDF. */
  normalised: Buffer;
  width: number;
  height: number;
  inkPixels: number;
}

/**
 * Checks a drawn signature sent as a PNG data URL: really a PNG (magic bytes and a full decode),
 * a sensible size, and enough ink to be a signature. Throws a 400 with a clear code otherwise.
 */
export async function checkSignature(dataUrl: string): Promise<CheckedSignature> {
  if (!dataUrl || dataUrl === 'data:,' || dataUrl === 'data:image/png;base64,') {
    throw badRequest('Please sign in the box before submitting.', { field: 'signature' }, 'SIGNATURE_EMPTY');
  }
  const m = DATA_URL.exec(dataUrl);
  const bytes = m ? Buffer.from(m[1], 'base64') : null;
  if (!bytes || bytes.length < PNG_MAGIC.length || !bytes.subarray(0, 8).equals(PNG_MAGIC)) {
    throw badRequest('The signature must be a PNG image drawn on the signature pad.', { field: 'signature' }, 'SIGNATURE_NOT_PNG');
  }
  const raw = await decodePng(bytes).catch(() => {
    throw badRequest('The signature image could not be read as a PNG.', { field: 'signature' }, 'SIGNATURE_NOT_PNG');
  });
  const { width, height, channels } = raw.info;
  if (width < 100 || height < 40 || width > 4096 || height > 4096) {
    throw badRequest('The signature image has an unexpected size.', { field: 'signature', width, height }, 'SIGNATURE_INVALID');
  }
  // Ink: visible (alpha) and darker than the paper, whether the pad is transparent or white.
  let ink = 0;
  for (let i = 0; i < raw.data.length; i += channels) {
    const a = raw.data[i + 3];
    const lum = (raw.data[i] * 299 + raw.data[i + 1] * 587 + raw.data[i + 2] * 114) / 1000;
    if (a > 64 && lum < 160) ink++;
  }
  if (ink < MIN_INK_PIXELS) {
    throw badRequest('Please sign in the box before submitting.', { field: 'signature' }, 'SIGNATURE_EMPTY');
  }
  const normalised = await sharp(raw.data, { raw: { width, height, channels } }).png().toBuffer();
  return { original: bytes, normalised, width, height, inkPixels: ink };
}

async function decodePng(bytes: Buffer) {
  const img = sharp(bytes, { failOn: 'error', limitInputPixels: 4096 * 4096 });
  const meta = await img.metadata();
  if (meta.format !== 'png') throw new Error('not a PNG');
  return img.ensureAlpha().raw().toBuffer({ resolveWithObject: true });
}

/** Letters compared without accents, case or punctuation ("Łukasiewicz-Řezníčková" ≈ "lukasiewicz reznickova"). */
export function nameTokens(s: string): string[] {
  const folded = s
    .normalize('NFKD')
    .replace(/\p{M}/gu, '')
    .toLowerCase()
    .replace(/[łđøħıß]/g, (c) => ({ ł: 'l', đ: 'd', ø: 'o', ħ: 'h', ı: 'i', ß: 'ss' })[c] ?? c);
  return folded.split(/[^\p{L}\p{N}]+/u).filter(Boolean);
}

/** True when every part of the patient's first and last name appears in the typed name. */
export function nameMatches(typed: string, patient: { firstName: string; lastName: string }): boolean {
  const got = new Set(nameTokens(typed));
  const want = [...nameTokens(patient.firstName), ...nameTokens(patient.lastName)];
  return want.length > 0 && want.every((t) => got.has(t));
}
