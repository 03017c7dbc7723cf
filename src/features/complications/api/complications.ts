import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { ActionInput, EnzymeProduct, EpisodeSummary, EpisodeView, FollowUpInput, StartEpisodeInput, UpdateEpisodeInput } from '../types';

export const complicationKeys = {
  all: ['complications'] as const,
  patient: (patientId: string) => [...complicationKeys.all, 'patient', patientId] as const,
  detail: (id: string) => [...complicationKeys.all, 'detail', id] as const,
  protocol: () => [...complicationKeys.all, 'protocol'] as const,
  enzymes: () => [...complicationKeys.all, 'enzymes'] as const,
};

export const getPatientEpisodes = (patientId: string, signal?: AbortSignal) => api<EpisodeSummary[]>(`/api/patients/${patientId}/complications`, { signal });
export const getEpisode = (id: string, signal?: AbortSignal) => api<EpisodeView>(`/api/complications/${id}`, { signal });
export const startEpisode = (visitId: string, input: StartEpisodeInput) => api<EpisodeView>(`/api/visits/${visitId}/complications`, { method: 'POST', body: input });
export const updateEpisode = (id: string, input: UpdateEpisodeInput) => api<EpisodeView>(`/api/complications/${id}`, { method: 'PATCH', body: input });
export const addAction = (id: string, input: ActionInput) => api<EpisodeView & { warnings: { code: string; message: string }[] }>(`/api/complications/${id}/actions`, { method: 'POST', body: input });
export const addFollowUp = (id: string, input: FollowUpInput) => api<EpisodeView>(`/api/complications/${id}/follow-ups`, { method: 'POST', body: input });
export const episodePdfUrl = (id: string) => `/api/complications/${id}/pdf`;
/** The clinic's protocol pointer, from the clinic settings every staff member may read. */
export const getProtocol = async (signal?: AbortSignal) => (await api<{ complicationProtocol: string }>('/api/settings', { signal })).complicationProtocol;
/** Hyaluronidase products of the catalogue, for the action form. */
export const getEnzymes = async (signal?: AbortSignal) => (await api<EnzymeProduct[]>('/api/products', { signal })).filter((p) => p.kind === 'hyaluronidase');

export const patientEpisodesQuery = (patientId: string) => queryOptions({ queryKey: complicationKeys.patient(patientId), queryFn: ({ signal }) => getPatientEpisodes(patientId, signal) });
export const episodeQuery = (id: string) => queryOptions({ queryKey: complicationKeys.detail(id), queryFn: ({ signal }) => getEpisode(id, signal) });
export const protocolQuery = () => queryOptions({ queryKey: complicationKeys.protocol(), queryFn: ({ signal }) => getProtocol(signal), staleTime: 5 * 60_000 });
export const enzymesQuery = () => queryOptions({ queryKey: complicationKeys.enzymes(), queryFn: ({ signal }) => getEnzymes(signal), staleTime: 60_000 });

export const usePatientEpisodes = (patientId: string) => useQuery(patientEpisodesQuery(patientId));
export const useEpisode = (id: string) => useQuery(episodeQuery(id));
export const useProtocol = () => useQuery(protocolQuery());
export const useEnzymes = () => useQuery(enzymesQuery());

export function useStartEpisode(visitId: string, patientId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: StartEpisodeInput) => startEpisode(visitId, input),
    onSuccess: (e) => {
      qc.setQueryData(complicationKeys.detail(e.id), e);
      return qc.invalidateQueries({ queryKey: complicationKeys.patient(patientId) });
    },
  });
}

/** Every change to an episode answers with the whole episode, which replaces the cached one. */
function useEpisodeChange<I, R extends EpisodeView>(id: string, fn: (id: string, input: I) => Promise<R>) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: I) => fn(id, input),
    onSuccess: (e) => {
      qc.setQueryData(complicationKeys.detail(id), e);
      return qc.invalidateQueries({ queryKey: complicationKeys.patient(e.patientId) });
    },
  });
}

export const useUpdateEpisode = (id: string) => useEpisodeChange(id, updateEpisode);
export const useAddAction = (id: string) => useEpisodeChange(id, addAction);
export const useAddFollowUp = (id: string) => useEpisodeChange(id, addFollowUp);
