import type { Timeline, TimelinePhoto, TimelineVisit } from '../../../server/features/compare/timeline';
import type { CompareMode, ComparisonSheetInput, ReviewSetup, StartReviewInput } from '../../../server/features/compare/compare.schemas';
import type { ComparedPhoto, OverlayPoints, PairComparison, Warning } from '../../../server/features/compare/comparison';
import type { LipMeasurements } from '../../../server/media/measurements';

export type { ComparedPhoto, CompareMode, ComparisonSheetInput, LipMeasurements, OverlayPoints, PairComparison, ReviewSetup, StartReviewInput, Timeline, TimelinePhoto, TimelineVisit, Warning };

/** The per-visit measurements of the patient (GET /api/patients/:id/measurements), as far as the trends chart reads them. */
export interface MeasurementSeries {
  target: { value: number; key: string; label: string } | null;
  caution: string;
  views: {
    viewKey: string;
    label: string;
    rows: { photoId: string; visitId: string; visitStartsAt: string | null; isBaseline: boolean; measurements: LipMeasurements }[];
  }[];
}

export type ReviewState = { active: false } | { active: true; patientId: string; startedAt: string; setup: ReviewSetup };

export const MODE_LABEL: Record<CompareMode, string> = {
  'side-by-side': 'Side by side',
  slider: 'Slider',
  strip: 'All visits',
};

/** Short names for the built-in views where space is tight (column heads, chips); other views use their label. */
export const SHORT_VIEW_LABEL: Record<string, string> = {
  'frontal-rest': 'Frontal rest',
  'frontal-smile': 'Frontal smile',
  'lips-rest': 'Lips rest',
  'lips-pucker': 'Lips pucker',
  'oblique-left': 'Oblique L',
  'oblique-right': 'Oblique R',
  'lateral-left': 'Lateral L',
  'lateral-right': 'Lateral R',
};
