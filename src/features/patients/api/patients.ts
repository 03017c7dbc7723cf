import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { PatientInput, PatientUpdate } from '../../../../server/features/patients/patients.schemas';
import type { Page, Patient } from '../types';

export interface PatientFilters {
  q: string;
  page: number;
  pageSize: number;
}

export const patientKeys = {
  all: ['patients'] as const,
  lists: () => [...patientKeys.all, 'list'] as const,
  list: (filters: PatientFilters) => [...patientKeys.lists(), filters] as const,
  details: () => [...patientKeys.all, 'detail'] as const,
  detail: (id: string) => [...patientKeys.details(), id] as const,
};

export const getPatients = (f: PatientFilters, signal?: AbortSignal) => api<Page<Patient>>('/api/patients', { query: { q: f.q, page: f.page, pageSize: f.pageSize }, signal });
export const getPatient = (id: string, signal?: AbortSignal) => api<Patient>(`/api/patients/${id}`, { signal });
export const createPatient = (input: PatientInput) => api<Patient>('/api/patients', { method: 'POST', body: input });
export const updatePatient = (id: string, input: PatientUpdate) => api<Patient>(`/api/patients/${id}`, { method: 'PATCH', body: input });

export const patientListQuery = (f: PatientFilters) =>
  queryOptions({ queryKey: patientKeys.list(f), queryFn: ({ signal }) => getPatients(f, signal), placeholderData: keepPreviousData });
export const patientQuery = (id: string) => queryOptions({ queryKey: patientKeys.detail(id), queryFn: ({ signal }) => getPatient(id, signal) });

export const usePatients = (f: PatientFilters) => useQuery(patientListQuery(f));
export const usePatient = (id: string) => useQuery(patientQuery(id));

export function useCreatePatient() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: createPatient,
    onSuccess: (p) => {
      qc.setQueryData(patientKeys.detail(p.id), p);
      return qc.invalidateQueries({ queryKey: patientKeys.lists() });
    },
  });
}

export function useUpdatePatient(id: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: PatientUpdate) => updatePatient(id, input),
    onSuccess: (p) => {
      qc.setQueryData(patientKeys.detail(id), p);
      return qc.invalidateQueries({ queryKey: patientKeys.lists() });
    },
  });
}
