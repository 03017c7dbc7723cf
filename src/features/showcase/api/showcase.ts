import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { CreateShowcaseRequestInput } from '../../../../server/features/showcase/showcase.schemas';
import type { PatientPhoto, PatientShowcase, ShowcaseChannel, ShowcaseExport, ShowcaseRequest, ShowcaseState } from '../types';

export const showcaseKeys = {
  all: ['showcase'] as const,
  patients: () => [...showcaseKeys.all, 'patient'] as const,
  patient: (patientId: string) => [...showcaseKeys.patients(), patientId] as const,
  photos: (patientId: string) => [...showcaseKeys.all, 'photos', patientId] as const,
  queues: () => [...showcaseKeys.all, 'queue'] as const,
  queue: (state: ShowcaseState | 'all') => [...showcaseKeys.queues(), state] as const,
};

export const getPatientShowcase = (patientId: string, signal?: AbortSignal) => api<PatientShowcase>(`/api/patients/${patientId}/showcase`, { signal });
export const getPatientPhotos = (patientId: string, signal?: AbortSignal) => api<PatientPhoto[]>(`/api/patients/${patientId}/photos`, { signal });
export const getQueue = (state: ShowcaseState | 'all', signal?: AbortSignal) =>
  api<ShowcaseRequest[]>('/api/showcase-requests', { query: { state: state === 'all' ? undefined : state }, signal });

export const patientShowcaseQuery = (patientId: string) => queryOptions({ queryKey: showcaseKeys.patient(patientId), queryFn: ({ signal }) => getPatientShowcase(patientId, signal) });
export const patientPhotosQuery = (patientId: string) => queryOptions({ queryKey: showcaseKeys.photos(patientId), queryFn: ({ signal }) => getPatientPhotos(patientId, signal) });
export const queueQuery = (state: ShowcaseState | 'all') => queryOptions({ queryKey: showcaseKeys.queue(state), queryFn: ({ signal }) => getQueue(state, signal) });

export const usePatientShowcase = (patientId: string) => useQuery(patientShowcaseQuery(patientId));
export const usePatientPhotos = (patientId: string) => useQuery(patientPhotosQuery(patientId));
export const useShowcaseQueue = (state: ShowcaseState | 'all') => useQuery(queueQuery(state));

function useShowcaseMutation<V, T>(fn: (v: V) => Promise<T>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: showcaseKeys.all }) });
}

export const useCreateShowcaseRequest = (patientId: string) =>
  useShowcaseMutation((input: CreateShowcaseRequestInput) => api<ShowcaseRequest>(`/api/patients/${patientId}/showcase-requests`, { method: 'POST', body: input }));
export const useClearRequest = () => useShowcaseMutation(({ id, note }: { id: string; note?: string }) => api<ShowcaseRequest>(`/api/showcase-requests/${id}/clear`, { method: 'POST', body: note ? { note } : {} }));
export const useDeclineRequest = () => useShowcaseMutation(({ id, note }: { id: string; note: string }) => api<ShowcaseRequest>(`/api/showcase-requests/${id}/decline`, { method: 'POST', body: { note } }));
export const useWithdrawRequest = () => useShowcaseMutation(({ id, reason }: { id: string; reason: string }) => api<ShowcaseRequest>(`/api/showcase-requests/${id}/withdraw`, { method: 'POST', body: { reason } }));
export const useExportRequest = () =>
  useShowcaseMutation(({ id, channel }: { id: string; channel: ShowcaseChannel }) => api<ShowcaseExport>(`/api/showcase-requests/${id}/exports`, { method: 'POST', body: { channel } }));
