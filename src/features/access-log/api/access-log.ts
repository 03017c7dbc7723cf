import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { AccessLogQuery } from '../../../../server/features/access-log/access-log.schemas';

export interface AccessEvent {
  id: string;
  at: string;
  actorId: string | null;
  actorName: string | null;
  actorRole: string;
  action: string;
  patientId: string | null;
  patientName: string | null;
  patientCode: string | null;
  targetType: string | null;
  targetId: string | null;
  ip: string | null;
  userAgent: string | null;
  details: Record<string, unknown>;
}

/** One page of the log, newest first; `newer`/`older` are the positions of the neighbouring pages (null at an end). */
export interface AccessLogPage {
  items: AccessEvent[];
  /** Exact up to the server's cap; with `totalIsAtLeast` the log holds more than `total` entries. */
  total: number;
  totalIsAtLeast: boolean;
  newer: string | null;
  older: string | null;
  pageSize: number;
}

export type AccessLogFilters = Omit<AccessLogQuery, 'pageSize'> & { pageSize: number };

export const accessLogKeys = {
  all: ['access-log'] as const,
  lists: () => [...accessLogKeys.all, 'list'] as const,
  list: (f: AccessLogFilters) => [...accessLogKeys.lists(), f] as const,
  staff: () => [...accessLogKeys.all, 'staff'] as const,
};

export const getAccessLog = (f: AccessLogFilters, signal?: AbortSignal) => api<AccessLogPage>('/api/access-log', { query: { ...f }, signal });

/** The CSV export link for the same filters (the whole log they match, not one page). */
export function accessLogCsvUrl(f: AccessLogFilters): string {
  const q = new URLSearchParams(Object.entries({ ...f, before: undefined, after: undefined, pageSize: undefined }).filter(([, v]) => v !== undefined && v !== '') as [string, string][]);
  return `/api/access-log.csv${q.size ? `?${q}` : ''}`;
}

export const accessLogQuery = (f: AccessLogFilters) =>
  queryOptions({ queryKey: accessLogKeys.list(f), queryFn: ({ signal }) => getAccessLog(f, signal), placeholderData: keepPreviousData });
export const useAccessLog = (f: AccessLogFilters) => useQuery(accessLogQuery(f));

export const useStaffNames = () =>
  useQuery({ queryKey: accessLogKeys.staff(), queryFn: ({ signal }) => api<{ id: string; name: string }[]>('/api/users', { signal }), staleTime: 5 * 60_000 });
