import type { PhotoDto } from '../../../server/features/photos/photos.routes';
import type { AnchorKind, CreateShotListInput, ShotListViewInput, UpdateShotListInput } from '../../../server/features/photos/photos.schemas';
import type { ShotListDto } from '../../../server/features/photos/shot-lists.service';

export type { AnchorKind, CreateShotListInput, PhotoDto, ShotListDto, ShotListViewInput, UpdateShotListInput };
export type ShotListViewDto = ShotListDto['views'][number];

/** A photo in the patient's list carries the start of its visit. */
export type PatientPhotoDto = PhotoDto & { visitStartsAt?: string };

export const ANCHOR_LABEL: Record<AnchorKind, string> = {
  face: 'Face, automatic',
  lips: 'Lips, automatic',
  profile: 'Profile, by hand',
};

/** The upload limit the server enforces (40 MB); checked here too so a too-large file fails at once. */
export const MAX_UPLOAD_BYTES = 40 * 1024 * 1024;

/** URL of one stored variant of a photo, or null when the photo has none in that format. */
export function variantUrl(photo: PhotoDto, variant: 'thumb' | 'display' | 'master', format: 'webp' | 'jpeg' = variant === 'master' ? 'jpeg' : 'webp'): string | null {
  return photo.variants.find((v) => v.variant === variant && v.format === format)?.url ?? null;
}
