import { z } from 'zod';

/**
 * How the landmarks of a view are found: `face` = the automatic 68-point face model, aligned on the eye centres;
 * `lips` = the same model, aligned on the lip corners (close-ups); `profile` = a few anchor points placed by hand
 * (lateral views, where the model cannot see the face).
 */
export const ANCHOR_KINDS = ['face', 'lips', 'profile'] as const;
export type AnchorKind = (typeof ANCHOR_KINDS)[number];

export const PHOTO_STATES = ['captured', 'replaced'] as const;
export type PhotoState = (typeof PHOTO_STATES)[number];

/** `aligned`: resampled into the view's standard frame after landmarks (rewritten in place, so it carries a `rev`). */
export const PHOTO_VARIANT_NAMES = ['master', 'display', 'thumb', 'aligned'] as const;
export type PhotoVariantName = (typeof PHOTO_VARIANT_NAMES)[number];
export const PHOTO_FORMATS = ['webp', 'jpeg'] as const;
export type PhotoFormat = (typeof PHOTO_FORMATS)[number];

/** The largest upload accepted, in bytes (a full-resolution camera JPEG is usually 5–15 MB). */
export const MAX_UPLOAD_BYTES = 40 * 1024 * 1024;
/** The largest image accepted, in pixels, checked from the file header before any pixel is decoded. */
export const MAX_INPUT_PIXELS = 100_000_000;

/** View keys are stable identifiers: photos, landmarks and comparisons refer to them. */
export const viewKeySchema = z
  .string()
  .regex(/^[a-z0-9][a-z0-9-]{0,39}$/, 'Use lowercase letters, digits and hyphens (at most 40), e.g. "frontal-rest".');

export const shotListViewSchema = z
  .object({
    key: viewKeySchema,
    label: z.string().trim().min(1, 'Give the view a name.').max(60, 'Use at most 60 characters.'),
    hint: z.string().trim().max(600, 'Use at most 600 characters.').default(''),
    anchorKind: z.enum(ANCHOR_KINDS, { message: 'Choose how the view is aligned: face, lips or profile.' }),
  })
  .strict();

const views = z
  .array(shotListViewSchema)
  .min(1, 'A shot list needs at least one view.')
  .max(24, 'Use at most 24 views.')
  .refine((vs) => new Set(vs.map((v) => v.key)).size === vs.length, { message: 'Each view key may appear only once.' });

export const createShotListSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the shot list a name.').max(80, 'Use at most 80 characters.'),
    views,
  })
  .strict();

export const updateShotListSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the shot list a name.').max(80, 'Use at most 80 characters.').optional(),
    /** The full, ordered list of views; keys already used by photos cannot be dropped. */
    views: views.optional(),
    archived: z.boolean().optional(),
  })
  .strict();

export const shotListQuerySchema = z.object({ all: z.enum(['0', '1']).optional() }).strict();

export const uploadPhotoFieldsSchema = z
  .object({
    view: z
      .string({ error: 'Say which view this photo shows (form field "view").' })
      .regex(/^[a-z0-9][a-z0-9-]{0,39}$/, 'Not a view key of this visit\'s shot list.'),
    patientId: z.string().uuid('Not a valid patient id.').optional(),
  })
  .strict();

export const visitPhotosQuerySchema = z.object({ all: z.enum(['0', '1']).optional() }).strict();

export const photoFileQuerySchema = z
  .object({
    variant: z.enum(PHOTO_VARIANT_NAMES, { message: 'Choose master, display, thumb or aligned.' }).default('display'),
    format: z.enum(PHOTO_FORMATS, { message: 'Choose webp or jpeg.' }).optional(),
    /** Cache-buster of variants rewritten in place; the bytes served are always the current ones. */
    rev: z.string().regex(/^\d{1,9}$/, 'Not a revision number.').optional(),
  })
  .strict();

export const setVisitShotListSchema = z.object({ shotListId: z.string().uuid('Choose a shot list.') }).strict();

export type ShotListViewInput = z.input<typeof shotListViewSchema>;
export type CreateShotListInput = z.input<typeof createShotListSchema>;
export type UpdateShotListInput = z.input<typeof updateShotListSchema>;
