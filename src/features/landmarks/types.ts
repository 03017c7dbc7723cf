export type {
  AlignmentState,
  LandmarkViewDto,
  LipMeasurements,
  LipRatioTargetDto,
  LipRatioTargetInput,
  MeasurementChange,
  MeasurementsDto,
  PairsDto,
  PutLandmarksInput,
  StoredLandmarks,
  ViewSummaryDto,
  XY,
} from '../../../server/features/landmarks/landmarks.schemas';
import type { AlignmentState } from '../../../server/features/landmarks/landmarks.schemas';

export const ALIGNMENT_LABEL: Record<AlignmentState, string> = {
  aligning: 'Aligning',
  aligned: 'Aligned',
  'needs-landmarks': 'Needs landmarks',
};
