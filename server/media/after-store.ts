import type { Deps } from '../deps.js';
import type { Photo } from '../entities/photo.js';

/** The part of the app's dependencies the photo pipeline uses (so seeding and the benchmark can run it too). */
export type PipelineDeps = Pick<Deps, 'db' | 'storage' | 'logger' | 'config'>;

/** What a step run after storing a photo gets: the committed row and the display-size pixels already in memory. */
export interface StoredPhoto {
  deps: PipelineDeps;
  photo: Photo;
  /** The display variant (~2048 px long edge), upright sRGB: raw RGB pixels and the stored JPEG. */
  display: { raw: Buffer; width: number; height: number; channels: 3; jpeg: Buffer };
}

export type AfterPhotoStored = (stored: StoredPhoto) => Promise<void>;

/**
 * The hook point of the photo pipeline: every step here runs, in order, after a new photo's objects and row are
 * committed (e.g. automatic landmarks and the aligned photo). A failing step is logged and never loses the photo:
 * the upload still succeeds and the step can be redone later.
 */
export const AFTER_PHOTO_STORED: AfterPhotoStored[] = [];

export async function runAfterPhotoStored(stored: StoredPhoto): Promise<void> {
  for (const step of AFTER_PHOTO_STORED) {
    try {
      await step(stored);
    } catch (err) {
      stored.deps.logger.warn({ err, photoId: stored.photo.id, step: step.name }, 'a step after storing a photo failed');
    }
  }
}
