import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { MailState, OutboxMail } from '../types';

export interface OutboxFilters {
  state?: MailState;
  page: number;
}

export const outboxKeys = {
  all: ['outbox'] as const,
  lists: () => [...outboxKeys.all, 'list'] as const,
  list: (f: OutboxFilters) => [...outboxKeys.lists(), f] as const,
  details: () => [...outboxKeys.all, 'detail'] as const,
  detail: (id: string) => [...outboxKeys.details(), id] as const,
};

export const getOutbox = (f: OutboxFilters, signal?: AbortSignal) =>
  api<{ items: OutboxMail[]; total: number; page: number; pageSize: number }>('/api/outbox', { query: { state: f.state, page: f.page }, signal });
export const getMail = (id: string, signal?: AbortSignal) => api<OutboxMail & { text: string; html: string | null }>(`/api/outbox/${id}`, { signal });

export const outboxQuery = (f: OutboxFilters) => queryOptions({ queryKey: outboxKeys.list(f), queryFn: ({ signal }) => getOutbox(f, signal), placeholderData: keepPreviousData });
export const mailQuery = (id: string) => queryOptions({ queryKey: outboxKeys.detail(id), queryFn: ({ signal }) => getMail(id, signal) });

export const useOutbox = (f: OutboxFilters) => useQuery({ ...outboxQuery(f), refetchInterval: 10_000 });
export const useMail = (id: string | null) => useQuery({ ...mailQuery(id ?? ''), enabled: Boolean(id) });

export function useRetryMail() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api<OutboxMail>(`/api/outbox/${id}/retry`, { method: 'POST' }),
    onSuccess: () => qc.invalidateQueries({ queryKey: outboxKeys.all }),
  });
}
