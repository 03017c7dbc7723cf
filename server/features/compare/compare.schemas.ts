import { z } from 'zod';

export const COMPARE_MODES = ['side-by-side', 'slider', 'strip'] as const;
export type CompareMode = (typeof COMPARE_MODES)[number];

const viewKey = z.string().regex(/^[a-z0-9][a-z0-9-]{0,39}$/, 'Not a view key, e.g. "frontal-rest".');
const photoId = z.string().uuid('Not a valid photo id.');

/** What review mode opens on; the patient may then switch modes, but never leaves this patient. */
export const startReviewSchema = z
  .object({
    view: viewKey,
    baselinePhotoId: photoId.optional(),
    followUpPhotoId: photoId.optional(),
    mode: z.enum(COMPARE_MODES, { message: 'Choose side by side, slider or strip.' }).default('side-by-side'),
    aligned: z.boolean().default(true),
  })
  .strict();
export type StartReviewInput = z.input<typeof startReviewSchema>;
export type ReviewSetup = z.output<typeof startReviewSchema>;

export const exitReviewSchema = z
  .object({ password: z.string({ error: 'Enter your password to leave review mode.' }).min(1, 'Enter your password to leave review mode.').max(200) })
  .strict();
export type ExitReviewInput = z.input<typeof exitReviewSchema>;

/**
 * The comparison sheet: a pair (two photos of one view) or a strip (every visit of one view, in time order).
 * Photo ids are given explicitly so the sheet shows exactly what was on screen.
 */
export const comparisonSheetSchema = z
  .object({
    view: viewKey,
    layout: z.enum(['pair', 'strip'], { message: 'Choose a pair or a strip.' }),
    /** Pair: [baseline, follow-up]. Strip: the photos in any order (the sheet sorts them by visit date). */
    photoIds: z.array(photoId).min(2, 'Choose at least two photos.').max(12, 'A sheet holds at most 12 photos.'),
    aligned: z.boolean().default(true),
  })
  .strict()
  .refine((s) => s.layout !== 'pair' || s.photoIds.length === 2, { message: 'A pair has exactly two photos.', path: ['photoIds'] })
  .refine((s) => new Set(s.photoIds).size === s.photoIds.length, { message: 'Each photo may appear only once.', path: ['photoIds'] });
export type ComparisonSheetInput = z.input<typeof comparisonSheetSchema>;

export const pairQuerySchema = z
  .object({
    baseline: photoId.describe('photo id of the baseline'),
    followUp: photoId.describe('photo id of the follow-up'),
  })
  .strict();
