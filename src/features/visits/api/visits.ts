import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { CreateVisitInput, UpdateVisitInput } from '../../../../server/features/visits/visits.schemas';
import type { ClinicDay, Practitioner, Visit } from '../types';

export const visitKeys = {
  all: ['visits'] as const,
  lists: () => [...visitKeys.all, 'list'] as const,
  list: (patientId: string) => [...visitKeys.lists(), { patientId }] as const,
  details: () => [...visitKeys.all, 'detail'] as const,
  detail: (id: string) => [...visitKeys.details(), id] as const,
  days: () => [...visitKeys.all, 'day'] as const,
  day: (date: string) => [...visitKeys.days(), date] as const,
  practitioners: () => [...visitKeys.all, 'practitioners'] as const,
};

export const getPatientVisits = (patientId: string, signal?: AbortSignal) => api<Visit[]>(`/api/patients/${patientId}/visits`, { signal });
export const getVisit = (id: string, signal?: AbortSignal) => api<Visit>(`/api/visits/${id}`, { signal });
export const getClinicDay = (date: string, signal?: AbortSignal) => api<ClinicDay>('/api/clinic-day', { query: { date }, signal });
export const getPractitioners = (signal?: AbortSignal) => api<Practitioner[]>('/api/practitioners', { signal });
export const createVisit = (patientId: string, input: CreateVisitInput) => api<Visit>(`/api/patients/${patientId}/visits`, { method: 'POST', body: input });
export const updateVisit = (id: string, input: UpdateVisitInput) => api<Visit>(`/api/visits/${id}`, { method: 'PATCH', body: input });

export const patientVisitsQuery = (patientId: string) => queryOptions({ queryKey: visitKeys.list(patientId), queryFn: ({ signal }) => getPatientVisits(patientId, signal) });
export const visitQuery = (id: string) => queryOptions({ queryKey: visitKeys.detail(id), queryFn: ({ signal }) => getVisit(id, signal) });
export const clinicDayQuery = (date: string) => queryOptions({ queryKey: visitKeys.day(date), queryFn: ({ signal }) => getClinicDay(date, signal), refetchInterval: 60_000 });
export const practitionersQuery = () => queryOptions({ queryKey: visitKeys.practitioners(), queryFn: ({ signal }) => getPractitioners(signal), staleTime: 5 * 60_000 });

export const usePatientVisits = (patientId: string) => useQuery(patientVisitsQuery(patientId));
export const useVisit = (id: string) => useQuery(visitQuery(id));
export const useClinicDay = (date: string) => useQuery(clinicDayQuery(date));
export const usePractitioners = () => useQuery(practitionersQuery());

export function useCreateVisit(patientId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateVisitInput) => createVisit(patientId, input),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: visitKeys.list(patientId) }), qc.invalidateQueries({ queryKey: visitKeys.days() })]),
  });
}

export function useUpdateVisit(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: UpdateVisitInput) => updateVisit(id, input),
    onSuccess: (v) => {
      qc.setQueryData(visitKeys.detail(id), (old: Visit | undefined) => ({ ...old, ...v }));
      return Promise.all([qc.invalidateQueries({ queryKey: visitKeys.lists() }), qc.invalidateQueries({ queryKey: visitKeys.days() })]);
    },
  });
}
