import { createHash } from 'node:crypto';
import exifr from 'exifr';
import type { Request } from 'express';
import sharp, { type Sharp } from 'sharp';
import { Photo, type PhotoVariant } from '../entities/photo.js';
import type { Visit } from '../entities/visit.js';
import type { PhotoFormat, PhotoVariantName } from '../features/photos/photos.schemas.js';
import { audit } from '../lib/audit.js';
import { conflict } from '../lib/errors.js';
import { newId, nowIso } from '../lib/time.js';
import { photoKey } from '../storage/keys.js';
import { runAfterPhotoStored, type PipelineDeps } from './after-store.js';
import { decodeUpright, inspectHeader, type DecodedImage } from './decode.js';

interface Encoding {
  format: PhotoFormat;
  ext: string;
  contentType: string;
  encode: (img: Sharp) => Sharp;
}

const jpeg = (quality: number): Encoding => ({
  format: 'jpeg',
  ext: 'jpg',
  contentType: 'image/jpeg',
  encode: (img) => img.jpeg({ quality, chromaSubsampling: '4:2:0' }),
});
// effort 2 of 6: about a third of the default's time at this size for a file a few per cent larger.
const webp = (quality: number): Encoding => ({
  format: 'webp',
  ext: 'webp',
  contentType: 'image/webp',
  encode: (img) => img.webp({ quality, effort: 2 }),
});

/**
 * Every stored variant of a photo. The master keeps the full upright resolution; the others are fitted inside a
 * square of `longEdge` (never enlarged) and each comes as WebP with a JPEG fallback.
 */
export const VARIANTS: readonly { name: PhotoVariantName; longEdge: number | null; encodings: readonly Encoding[] }[] = [
  { name: 'master', longEdge: null, encodings: [jpeg(92)] },
  { name: 'display', longEdge: 2048, encodings: [webp(82), jpeg(85)] },
  { name: 'thumb', longEdge: 320, encodings: [webp(78), jpeg(80)] },
];

export interface RenderedVariant {
  variant: PhotoVariantName;
  format: PhotoFormat;
  ext: string;
  contentType: string;
  data: Buffer;
  width: number;
  height: number;
}

export interface RenderedPhoto {
  width: number;
  height: number;
  outputs: RenderedVariant[];
  /** The display-size pixels, handed to the steps after storing. */
  display: DecodedImage;
}

const rawInput = (img: DecodedImage) => ({ raw: { width: img.width, height: img.height, channels: img.channels } });

async function resizeRaw(img: DecodedImage, longEdge: number): Promise<DecodedImage> {
  if (img.width <= longEdge && img.height <= longEdge) return img;
  const { data, info } = await sharp(img.data, rawInput(img))
    .resize(longEdge, longEdge, { fit: 'inside', withoutEnlargement: true })
    .raw()
    .toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height, channels: 3 };
}

async function encodeAll(img: DecodedImage, name: PhotoVariantName, encodings: readonly Encoding[]): Promise<RenderedVariant[]> {
  return Promise.all(
    encodings.map(async (e) => ({
      variant: name,
      format: e.format,
      ext: e.ext,
      contentType: e.contentType,
      data: await e.encode(sharp(img.data, rawInput(img))).toBuffer(),
      width: img.width,
      height: img.height,
    })),
  );
}

/**
 * Decodes the upload once and makes every variant of `VARIANTS` from those pixels: each smaller size is resized
 * from the next larger one, and the master is encoded while the smaller sizes are made (libvips runs each on its
 * own worker thread). `onOutput` hears of each variant as soon as it is encoded, so it can be stored meanwhile.
 */
export async function renderVariants(bytes: Buffer, onOutput?: (o: RenderedVariant) => void): Promise<RenderedPhoto> {
  const full = await decodeUpright(bytes);
  let display: DecodedImage = full;
  const sized = VARIANTS.filter((v) => v.longEdge !== null).sort((a, b) => b.longEdge! - a.longEdge!);
  const emit = (outs: RenderedVariant[]) => {
    if (onOutput) outs.forEach(onOutput);
    return outs;
  };
  const [master, smaller] = await Promise.all([
    encodeAll(full, 'master', VARIANTS.find((v) => v.name === 'master')!.encodings).then(emit),
    (async () => {
      const out: RenderedVariant[] = [];
      let source = full;
      for (const v of sized) {
        source = await resizeRaw(source, v.longEdge!);
        if (v.name === 'display') display = source;
        out.push(...emit(await encodeAll(source, v.name, v.encodings)));
      }
      return out;
    })(),
  ]);
  return { width: full.width, height: full.height, outputs: [...master, ...smaller], display };
}

export interface CaptureInfo {
  /** UTC ISO time from EXIF, or null when the file does not say. */
  capturedAt: string | null;
  orientation: number | null;
}

const EXIF_DATE = /^(\d{4}):(\d{2}):(\d{2})[ T](\d{2}):(\d{2}):(\d{2})/;
const EXIF_OFFSET = /^([+-])(\d{2}):(\d{2})$/;

/** The UTC instant of a wall-clock time in an IANA time zone. */
function zonedToUtc(fields: number[], timeZone: string): number {
  const [y, mo, d, h, mi, s] = fields;
  const asUtc = Date.UTC(y, mo - 1, d, h, mi, s);
  const offsetAt = (ms: number) => {
    const p = new Intl.DateTimeFormat('en-US', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' }).formatToParts(new Date(ms));
    const g = (t: string) => Number(p.find((x) => x.type === t)?.value);
    return Date.UTC(g('year'), g('month') - 1, g('day'), g('hour'), g('minute'), g('second')) - ms;
  };
  const guess = asUtc - offsetAt(asUtc);
  return asUtc - offsetAt(guess);
}

/**
 * Reads the capture time and orientation from EXIF before anything else touches the file. The EXIF time has no
 * zone unless OffsetTimeOriginal (Exif 2.31) is present; without it the clinic's time zone is assumed.
 * Times before 1990 or more than a day ahead are treated as a wrong camera clock and ignored.
 */
export async function readCaptureInfo(bytes: Buffer, clinicTimeZone: string): Promise<CaptureInfo> {
  let tags: Record<string, unknown> | undefined;
  try {
    tags = await exifr.parse(bytes, {
      tiff: true,
      exif: true,
      gps: false,
      ifd1: false,
      xmp: false,
      icc: false,
      iptc: false,
      jfif: false,
      ihdr: false,
      makerNote: false,
      userComment: false,
      reviveValues: false,
      translateValues: false,
      pick: ['DateTimeOriginal', 'CreateDate', 'OffsetTimeOriginal', 'Orientation'],
    });
  } catch {
    tags = undefined;
  }
  const orientation = Number(tags?.Orientation);
  const raw = String(tags?.DateTimeOriginal ?? tags?.CreateDate ?? '');
  const m = EXIF_DATE.exec(raw);
  let capturedAt: string | null = null;
  if (m) {
    const fields = m.slice(1).map(Number);
    const off = EXIF_OFFSET.exec(String(tags?.OffsetTimeOriginal ?? ''));
    const ms = off
      ? Date.UTC(fields[0], fields[1] - 1, fields[2], fields[3], fields[4], fields[5]) - (off[1] === '-' ? -1 : 1) * (Number(off[2]) * 60 + Number(off[3])) * 60_000
      : zonedToUtc(fields, clinicTimeZone);
    if (Number.isFinite(ms) && ms >= Date.UTC(1990, 0, 1) && ms <= Date.now() + 86_400_000) capturedAt = new Date(ms).toISOString();
  }
  return { capturedAt, orientation: Number.isInteger(orientation) && orientation >= 1 && orientation <= 8 ? orientation : null };
}

export interface IngestInput {
  visit: Pick<Visit, 'id' | 'patientId'>;
  viewKey: string;
  bytes: Buffer;
  uploadedById: string;
  /** The request, for the access log; null for seeding. */
  req: Request | null;
  /** Run the steps after storing (landmarks…); default true. The benchmark turns them off to time the pipeline alone. */
  afterStore?: boolean;
}

export interface IngestResult {
  photo: Photo;
  /** False when the same file was already stored for this view of this visit. */
  created: boolean;
}

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

/**
 * The photo pipeline (DESIGN §6): header check → EXIF capture time and orientation → one decode (upright, sRGB,
 * no metadata) → variants → objects written → row committed in one transaction (retakes mark the earlier photo
 * replaced) → steps after storing. Any failure after the first object is written deletes what was written, so
 * neither an orphan row nor an orphan object is left.
 */
export async function ingestPhoto(deps: PipelineDeps, input: IngestInput): Promise<IngestResult> {
  const { db, storage } = deps;
  const photos = db.getRepository(Photo);
  const sourceSha256 = sha256(input.bytes);
  const where = { visitId: input.visit.id, viewKey: input.viewKey, sourceSha256 };
  const same = await photos.findOneBy(where);
  if (same) return duplicateOf(same);

  await inspectHeader(input.bytes);
  const capture = await readCaptureInfo(input.bytes, deps.config.clinicTimeZone);

  const id = newId();
  const now = nowIso();
  const keyOf = (o: RenderedVariant) => photoKey({ patientId: input.visit.patientId, visitId: input.visit.id, photoId: id, variant: o.variant, ext: o.ext });
  // Each variant is written as soon as it is encoded, while the others are still being made.
  const writes: Promise<void>[] = [];
  const keys: string[] = [];
  let replaced: string | null = null;
  let photo: Photo;
  let rendered: RenderedPhoto;
  try {
    rendered = await renderVariants(input.bytes, (o) => {
      const write = storage.put(keyOf(o), o.data, o.contentType);
      // Handled here so a failure while other variants are still encoding is not an unhandled rejection.
      write.catch(() => undefined);
      keys.push(keyOf(o));
      writes.push(write);
    });
    const master = rendered.outputs.find((o) => o.variant === 'master')!;
    photo = photos.create({
      id,
      patientId: input.visit.patientId,
      visitId: input.visit.id,
      viewKey: input.viewKey,
      state: 'captured',
      replacedById: null,
      width: rendered.width,
      height: rendered.height,
      capturedAt: capture.capturedAt ?? now,
      captureTimeSource: capture.capturedAt ? 'exif' : 'upload',
      sourceOrientation: capture.orientation,
      uploadedAt: now,
      uploadedById: input.uploadedById,
      sha256: sha256(master.data),
      sourceSha256,
      sourceBytes: input.bytes.length,
      variants: rendered.outputs.map((o): PhotoVariant => ({ variant: o.variant, format: o.format, key: keyOf(o), width: o.width, height: o.height, bytes: o.data.length })),
    });
    const failed = (await Promise.allSettled(writes)).find((p): p is PromiseRejectedResult => p.status === 'rejected');
    if (failed) throw failed.reason;
    await db.transaction(async (tx) => {
      const repo = tx.getRepository(Photo);
      const current = await repo.findOneBy({ visitId: input.visit.id, viewKey: input.viewKey, state: 'captured' });
      if (current) {
        await repo.update({ id: current.id }, { state: 'replaced', replacedById: id });
        replaced = current.id;
      }
      await repo.insert(photo);
      await audit(tx, input.req, {
        action: current ? 'photo.retake' : 'photo.upload',
        patientId: photo.patientId,
        targetType: 'photo',
        targetId: photo.id,
        details: { visitId: photo.visitId, view: photo.viewKey, ...(current ? { replaced: current.id } : {}) },
        ...(input.req ? {} : { actorId: input.uploadedById, actorRole: 'system' }),
      });
    });
  } catch (err) {
    // Wait for writes still in flight, then delete everything this upload wrote.
    await Promise.allSettled(writes);
    if (keys.length) {
      await storage.remove(keys).catch((cleanupErr: unknown) => {
        deps.logger.error({ err: cleanupErr, photoId: id }, 'could not delete the objects of a failed photo upload; no row refers to them');
      });
    }
    // Two uploads of the same file raced: the other one won, answer with it.
    const winner = await photos.findOneBy(where).catch(() => null);
    if (winner) return duplicateOf(winner);
    throw err;
  }
  deps.logger.info({ photoId: id, visitId: photo.visitId, view: photo.viewKey, replaced }, 'photo stored');

  const displayJpeg = rendered.outputs.find((o) => o.variant === 'display' && o.format === 'jpeg')!;
  if (input.afterStore !== false) {
    const { data, width, height } = rendered.display;
    await runAfterPhotoStored({ deps, photo, display: { raw: data, width, height, channels: 3, jpeg: displayJpeg.data } });
  }
  return { photo, created: true };
}

function duplicateOf(existing: Photo): IngestResult {
  if (existing.state === 'replaced') {
    throw conflict('This file is an earlier photo of this view that was retaken. Take a new photo instead.', { photoId: existing.id }, 'REPLACED_DUPLICATE');
  }
  return { photo: existing, created: false };
}
