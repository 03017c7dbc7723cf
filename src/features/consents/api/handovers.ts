import { useEffect } from 'react';
import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, resetCsrf } from '../../../lib/api-client';
import type { ClaimHandoverInput, CreateHandoverInput, SignFormInput } from '../../../../server/features/consents/handover.schemas';
import type { CurrentHandover, HandoverStatus, StartedHandover } from '../types';

export const handoverKeys = {
  all: ['handovers'] as const,
  details: () => [...handoverKeys.all, 'detail'] as const,
  detail: (id: string) => [...handoverKeys.details(), id] as const,
  /** The hand-over this device is bound to (patient side). */
  current: () => [...handoverKeys.all, 'current'] as const,
};

export const getHandoverStatus = (id: string, signal?: AbortSignal) => api<HandoverStatus>(`/api/handovers/${id}`, { signal });
export const getCurrentHandover = (signal?: AbortSignal) => api<CurrentHandover>('/api/handover', { signal });

export const handoverStatusQuery = (id: string) => queryOptions({ queryKey: handoverKeys.detail(id), queryFn: ({ signal }) => getHandoverStatus(id, signal) });
export const currentHandoverQuery = () => queryOptions({ queryKey: handoverKeys.current(), queryFn: ({ signal }) => getCurrentHandover(signal), retry: false });

/** Staff watch a second-device hand-over until it ends. */
export const useHandoverStatus = (id: string | null) =>
  useQuery({ ...handoverStatusQuery(id ?? ''), enabled: Boolean(id), refetchInterval: (q) => (q.state.data && ['waiting', 'in-progress'].includes(q.state.data.state) ? 3000 : false) });

export const useCurrentHandover = (enabled = true) => useQuery({ ...currentHandoverQuery(), enabled });

/**
 * Starts a hand-over. On "this device" the server ends the staff sign-in, so the CSRF token is renewed;
 * the staff data still cached is dropped by the hand-over page (dropping it here would send the staff
 * screens to sign-in before the hand-over page has loaded).
 */
export function useStartHandover() {
  return useMutation({
    mutationFn: (input: CreateHandoverInput) => api<StartedHandover>('/api/handovers', { method: 'POST', body: input }),
    onSuccess: (h) => {
      if (h.mode === 'this-device') resetCsrf();
    },
  });
}

/** Drops everything cached by an earlier staff sign-in on this device, keeping only the hand-over's own data. */
export function useForgetStaffData() {
  const qc = useQueryClient();
  useEffect(() => {
    qc.removeQueries({ predicate: (q) => q.queryKey[0] !== handoverKeys.all[0] });
  }, [qc]);
}

export function useCancelHandover() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api<void>(`/api/handovers/${id}/cancel`, { method: 'POST' }),
    onSuccess: (_v, id) => qc.invalidateQueries({ queryKey: handoverKeys.detail(id) }),
  });
}

export function useClaimHandover() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: ClaimHandoverInput) => api<{ id: string; expiresAt: string }>('/api/handover/claim', { method: 'POST', body: input }),
    onSuccess: () => {
      // The session changed: drop anything another sign-in cached, then load this hand-over's forms.
      resetCsrf();
      qc.removeQueries({ predicate: (q) => q.queryKey[0] !== handoverKeys.all[0] });
      return qc.resetQueries({ queryKey: handoverKeys.current() });
    },
  });
}

export const markShown = (templateId: string) => api<{ shownAt: string }>(`/api/handover/forms/${templateId}/shown`, { method: 'POST' });

export function useSignForm() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ templateId, ...input }: SignFormInput & { templateId: string }) =>
      api<{ consentId: string; completed: boolean; warnings: { code: string; message: string }[] }>(`/api/handover/forms/${templateId}/sign`, { method: 'POST', body: input }),
    onSuccess: () => qc.invalidateQueries({ queryKey: handoverKeys.current() }),
  });
}

export function useDeclineForm() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (templateId: string) => api<{ completed: boolean }>(`/api/handover/forms/${templateId}/decline`, { method: 'POST' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: handoverKeys.current() }),
  });
}
