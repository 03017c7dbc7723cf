import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { LandmarkViewDto, LipRatioTargetDto, LipRatioTargetInput, MeasurementsDto, PutLandmarksInput } from '../types';

export const landmarkKeys = {
  all: ['landmarks'] as const,
  photos: () => [...landmarkKeys.all, 'photo'] as const,
  photo: (photoId: string) => [...landmarkKeys.photos(), photoId] as const,
  measurements: () => [...landmarkKeys.all, 'measurements'] as const,
  patientMeasurements: (patientId: string, baseline: string | null) => [...landmarkKeys.measurements(), patientId, baseline] as const,
};

export const getPhotoLandmarks = (photoId: string, signal?: AbortSignal) => api<LandmarkViewDto>(`/api/photos/${photoId}/landmarks`, { signal });
export const putPhotoLandmarks = (photoId: string, input: PutLandmarksInput) =>
  api<LandmarkViewDto>(`/api/photos/${photoId}/landmarks`, { method: 'PUT', body: input });
export const resetPhotoLandmarks = (photoId: string) => api<LandmarkViewDto>(`/api/photos/${photoId}/landmarks/reset`, { method: 'POST', body: {} });
export const getMeasurements = (patientId: string, baseline: string | null, signal?: AbortSignal) =>
  api<MeasurementsDto>(`/api/patients/${patientId}/measurements`, { query: { baseline }, signal });
export const setLipRatioTarget = (patientId: string, input: LipRatioTargetInput) =>
  api<LipRatioTargetDto>(`/api/patients/${patientId}/lip-ratio-target`, { method: 'PATCH', body: input });

/** Polls while the server is still aligning, so the screen updates by itself when the photo is done. */
export const photoLandmarksQuery = (photoId: string) =>
  queryOptions({
    queryKey: landmarkKeys.photo(photoId),
    queryFn: ({ signal }) => getPhotoLandmarks(photoId, signal),
    refetchInterval: (q) => (q.state.data?.alignmentState === 'aligning' ? 1000 : false),
  });

export const measurementsQuery = (patientId: string, baseline: string | null) =>
  queryOptions({
    queryKey: landmarkKeys.patientMeasurements(patientId, baseline),
    queryFn: ({ signal }) => getMeasurements(patientId, baseline, signal),
    enabled: !!patientId,
  });

export const usePhotoLandmarks = (photoId: string) => useQuery(photoLandmarksQuery(photoId));
export const useMeasurements = (patientId: string, baseline: string | null) => useQuery(measurementsQuery(patientId, baseline));

/** Landmark writes answer with the photo's new landmark view; measurements of the patient change with them. */
function useLandmarkWrite<V>(photoId: string, fn: (v: V) => Promise<LandmarkViewDto>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: fn,
    onSuccess: (data) => {
      qc.setQueryData(landmarkKeys.photo(photoId), data);
      return qc.invalidateQueries({ queryKey: landmarkKeys.measurements() });
    },
  });
}

export const useSaveLandmarks = (photoId: string) => useLandmarkWrite(photoId, (input: PutLandmarksInput) => putPhotoLandmarks(photoId, input));
export const useResetLandmarks = (photoId: string) => useLandmarkWrite(photoId, () => resetPhotoLandmarks(photoId));

export function useSetLipRatioTarget(patientId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: LipRatioTargetInput) => setLipRatioTarget(patientId, input),
    onSuccess: () => qc.invalidateQueries({ queryKey: landmarkKeys.measurements() }),
  });
}
