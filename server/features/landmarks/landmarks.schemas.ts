import { z } from 'zod';
import type { LipMeasurements, MeasurementChange } from '../../media/measurements.js';
import type { Pose, PoseWarning } from '../../media/pose.js';
import type { QualityWarning } from '../../media/quality.js';

export type { LipMeasurements, MeasurementChange, Pose, PoseWarning, QualityWarning };

/** aligning: waiting for or running detection and alignment; needs-landmarks: anchors must be placed by hand. */
export const ALIGNMENT_STATES = ['aligning', 'aligned', 'needs-landmarks'] as const;
export type AlignmentState = (typeof ALIGNMENT_STATES)[number];

export type XY = [number, number];

/** Landmarks of a photo, in the pixels of its display variant. */
export interface StoredLandmarks {
  source: 'auto' | 'manual';
  /** 68 slots in the iBUG 300-W order; null slots are not placed. Null when only anchors were placed. */
  points: (XY | null)[] | null;
  /** Anchors placed by hand (views the model cannot see); null when the points hold them. */
  anchors: XY[] | null;
  ruler: { a: XY; b: XY; lengthMm: number } | null;
  /** Detector confidence of automatic landmarks. */
  score: number | null;
  box: { x: number; y: number; width: number; height: number } | null;
  imageWidth: number;
  imageHeight: number;
  editedAt: string | null;
  editedById: string | null;
}

export interface StoredAlignment {
  /** The landmark revision this alignment was made from; also busts the aligned file's cache. */
  rev: number;
  viewKey: string;
  frame: { width: number; height: number };
  /** Display pixels → frame pixels, row-major 2×3. */
  matrix: [[number, number, number], [number, number, number]];
  scale: number;
  angleDeg: number;
  /** RMS distance of the fitted points from their frame positions, frame pixels. */
  residual: number;
  anchors: XY[];
  /** What the transform was fitted on: the view's stable 68-point subset, or its anchors. Absent on older rows. */
  fit?: 'stable-points' | 'anchors';
  /** Image registration to the view's baseline (or, for a lips close-up, to the visit's frontal photo). */
  registeredTo?: RegistrationNote | null;
  alignedAt: string;
}

/** One registration run: to which photo (at which alignment revision), how well, and whether it was kept. */
export interface RegistrationNote {
  photoId: string;
  rev: number;
  /** Correlation coefficient over the stable region before and after (−1…1). */
  rhoBefore: number;
  rhoAfter: number;
  /** Largest move of the stable region's corners from the landmark fit, frame pixels. */
  shiftPx: number;
  accepted: boolean;
}

export interface StoredQuality {
  sharpness: number;
  highlights: number;
  shadows: number;
  skinLab: [number, number, number] | null;
}

const coord = z.number({ error: 'Coordinates must be numbers.' });
const xy = z.tuple([coord, coord], { error: 'A point is [x, y].' });

/** Body of PUT /api/photos/:id/landmarks. Geometry (count, inside the image, anchors apart) is checked by the route. */
export const putLandmarksSchema = z
  .object({
    points: z.array(xy.nullable()).max(200).nullable().optional(),
    anchors: z.array(xy).max(10).nullable().optional(),
    ruler: z.object({ a: xy, b: xy, lengthMm: z.number() }).strict().nullable().optional(),
  })
  .strict();
export type PutLandmarksInput = z.infer<typeof putLandmarksSchema>;

/**
 * Upper:lower lip ratio targets, written 1:x (FACTS 7): 1:1.6 as an "ideal" in young adults (Acta Otorhinolaryngol
 * Ital 2018), 1:2 rated most attractive (Popenko et al., JAMA Facial Plast Surg 2017), equal lips preferred by many
 * patients (Heidekrueger et al., J Craniomaxillofac Surg 2017).
 */
export const LIP_RATIO_PRESETS = [
  { key: '1:1', value: 1, label: 'Equal lips (1:1)' },
  { key: '1:1.6', value: 1.6, label: 'Upper slightly smaller (1:1.6)' },
  { key: '1:2', value: 2, label: 'Lower twice the upper (1:2)' },
] as const;

export const lipRatioTargetSchema = z
  .object({
    target: z.enum(['1:1', '1:1.6', '1:2', 'custom', 'none'], { message: 'Choose 1:1, 1:1.6, 1:2, custom or none.' }),
    value: z.number({ error: 'Give the custom ratio as a number, e.g. 1.4 for 1:1.4.' }).min(0.5, 'Use a ratio between 1:0.5 and 1:3.').max(3, 'Use a ratio between 1:0.5 and 1:3.').optional(),
  })
  .strict()
  .refine((b) => b.target !== 'custom' || b.value !== undefined, { message: 'A custom target needs a value, e.g. 1.4 for 1:1.4.', path: ['value'] });

export const pairsQuerySchema = z
  .object({ view: z.string({ error: 'Say which view to pair, e.g. view=frontal-rest.' }).regex(/^[a-z0-9][a-z0-9-]{0,39}$/, 'Not a view key.') })
  .strict();

export const measurementsQuerySchema = z.object({ baseline: z.string().uuid('Not a valid visit id.').optional() }).strict();

/** Shown wherever a ratio or measurement is (DESIGN §8). */
export const MEASUREMENT_CAUTION =
  'Measurements and ratios are guides for discussion, not treatment targets. Treatment decisions rest with a suitably qualified, licensed practitioner.';

export function ratioTargetView(value: number | null) {
  if (value === null) return null;
  const preset = LIP_RATIO_PRESETS.find((p) => Math.abs(p.value - value) < 1e-9);
  return { value, key: preset?.key ?? 'custom', label: preset?.label ?? `Custom (1:${value})` };
}

/** A view's alignment definition as the client sees it. */
export interface ViewSummaryDto {
  key: string;
  label: string;
  kind: 'face' | 'lips' | 'profile';
  measured: boolean;
  frame: { width: number; height: number };
  anchors: { key: string; label: string; from68: readonly number[] }[];
}

export interface PlainWarning {
  code: string;
  message: string;
}

/** GET /api/photos/:id/landmarks (and the answer to PUT and reset). */
export interface LandmarkViewDto {
  photoId: string;
  patientId: string;
  visitId: string;
  view: ViewSummaryDto;
  alignmentState: AlignmentState;
  alignmentNote: string | null;
  image: { url: string | null; width: number; height: number } | null;
  aligned: { url: string | null; jpegUrl: string | null; width: number; height: number; rev: number } | null;
  landmarks: StoredLandmarks | null;
  alignment: StoredAlignment | null;
  pose: Pose | null;
  quality: StoredQuality | null;
  measurements: LipMeasurements | null;
  warnings: PlainWarning[];
  caution: string;
}

/** GET /api/patients/:id/pairs?view= */
export interface PairsDto {
  view: ViewSummaryDto | { key: string };
  baselinePhotoId: string | null;
  photos: {
    photoId: string;
    visitId: string;
    visitStartsAt: string | null;
    visitKind: string | null;
    capturedAt: string;
    isBaseline: boolean;
    alignmentState: AlignmentState;
    alignmentNote: string | null;
    landmarksSource: 'auto' | 'manual' | null;
    aligned: { url: string | null; jpegUrl: string | null; width: number; height: number } | null;
    displayUrl: string | null;
    thumbUrl: string | null;
    pose: Pose | null;
    warnings: PlainWarning[];
  }[];
}

export type RatioTargetDto = { value: number; key: string; label: string } | null;

/** GET /api/patients/:id/measurements */
export interface MeasurementsDto {
  target: RatioTargetDto;
  presets: typeof LIP_RATIO_PRESETS;
  caution: string;
  baselineVisitId: string | null;
  views: {
    viewKey: string;
    label: string;
    baselinePhotoId: string;
    rows: {
      photoId: string;
      visitId: string;
      visitStartsAt: string | null;
      visitKind: string | null;
      capturedAt: string;
      isBaseline: boolean;
      alignmentState: AlignmentState;
      landmarksSource: 'auto' | 'manual' | null;
      measurements: LipMeasurements;
      change: MeasurementChange | null;
    }[];
  }[];
}

/** PATCH /api/patients/:id/lip-ratio-target */
export interface LipRatioTargetDto {
  target: RatioTargetDto;
  presets: typeof LIP_RATIO_PRESETS;
  caution: string;
}
export type LipRatioTargetInput = z.input<typeof lipRatioTargetSchema>;
