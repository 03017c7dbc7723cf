import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { AcknowledgeFlagsInput, WithdrawInput } from '../../../../server/features/consents/consents.schemas';
import type { Consent, ConsentVerification, OpenItems } from '../types';

export const consentKeys = {
  all: ['consents'] as const,
  lists: () => [...consentKeys.all, 'list'] as const,
  list: (patientId: string) => [...consentKeys.lists(), patientId] as const,
  verifications: () => [...consentKeys.all, 'verify'] as const,
  verification: (id: string) => [...consentKeys.verifications(), id] as const,
  openItemsAll: () => [...consentKeys.all, 'open-items'] as const,
  openItems: (visitId: string) => [...consentKeys.openItemsAll(), visitId] as const,
};

export const getPatientConsents = (patientId: string, signal?: AbortSignal) => api<Consent[]>(`/api/patients/${patientId}/consents`, { signal });
export const verifyConsent = (id: string, signal?: AbortSignal) => api<ConsentVerification>(`/api/consents/${id}/verify`, { signal });
export const getOpenItems = (visitId: string, signal?: AbortSignal) => api<OpenItems>(`/api/visits/${visitId}/open-items`, { signal });
/** The signed PDF is opened by the browser itself (a same-origin GET; the server checks the role and logs it). */
export const consentPdfUrl = (id: string) => `/api/consents/${id}/pdf`;

export const patientConsentsQuery = (patientId: string) =>
  queryOptions({ queryKey: consentKeys.list(patientId), queryFn: ({ signal }) => getPatientConsents(patientId, signal) });
export const verificationQuery = (id: string) => queryOptions({ queryKey: consentKeys.verification(id), queryFn: ({ signal }) => verifyConsent(id, signal), staleTime: 0 });
export const openItemsQuery = (visitId: string) => queryOptions({ queryKey: consentKeys.openItems(visitId), queryFn: ({ signal }) => getOpenItems(visitId, signal) });

/** Polls while an e-mail is still on its way, so "e-mailed at" appears without a reload. */
export const usePatientConsents = (patientId: string) =>
  useQuery({
    ...patientConsentsQuery(patientId),
    refetchInterval: (q) => (q.state.data?.some((c) => c.email?.state === 'pending' || c.email?.state === 'sending') ? 5000 : false),
  });
export const useVerification = (id: string, enabled: boolean) => useQuery({ ...verificationQuery(id), enabled });
export const useOpenItems = (visitId: string) => useQuery(openItemsQuery(visitId));

export function useWithdrawConsent(patientId: string) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: WithdrawInput & { id: string }) => api<Consent>(`/api/consents/${id}/withdraw`, { method: 'POST', body: input }),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: consentKeys.list(patientId) }), qc.invalidateQueries({ queryKey: consentKeys.openItemsAll() })]),
  });
}

export function useAcknowledgeFlags() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...input }: AcknowledgeFlagsInput & { id: string }) => api<{ consentId: string }>(`/api/consents/${id}/acknowledge-flags`, { method: 'POST', body: input }),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: consentKeys.lists() }), qc.invalidateQueries({ queryKey: consentKeys.openItemsAll() })]),
  });
}
