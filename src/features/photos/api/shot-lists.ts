import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { CreateShotListInput, ShotListDto, UpdateShotListInput } from '../types';

export const shotListKeys = {
  all: ['shot-lists'] as const,
  lists: () => [...shotListKeys.all, 'list'] as const,
  list: (includeArchived: boolean) => [...shotListKeys.lists(), { includeArchived }] as const,
  details: () => [...shotListKeys.all, 'detail'] as const,
  detail: (id: string) => [...shotListKeys.details(), id] as const,
};

export const getShotLists = (includeArchived: boolean, signal?: AbortSignal) =>
  api<ShotListDto[]>('/api/shot-lists', { query: { all: includeArchived ? 1 : undefined }, signal });
export const getShotList = (id: string, signal?: AbortSignal) => api<ShotListDto>(`/api/shot-lists/${id}`, { signal });
export const createShotList = (input: CreateShotListInput) => api<ShotListDto>('/api/shot-lists', { method: 'POST', body: input });
export const updateShotList = (id: string, input: UpdateShotListInput) => api<ShotListDto>(`/api/shot-lists/${id}`, { method: 'PATCH', body: input });
export const setVisitShotList = (visitId: string, shotListId: string) => api<ShotListDto>(`/api/visits/${visitId}/shot-list`, { method: 'PUT', body: { shotListId } });

export const shotListsQuery = (includeArchived = false) =>
  queryOptions({ queryKey: shotListKeys.list(includeArchived), queryFn: ({ signal }) => getShotLists(includeArchived, signal), staleTime: 5 * 60_000 });
export const shotListQuery = (id: string) => queryOptions({ queryKey: shotListKeys.detail(id), queryFn: ({ signal }) => getShotList(id, signal), staleTime: 5 * 60_000 });

export const useShotLists = (includeArchived = false) => useQuery(shotListsQuery(includeArchived));
export const useShotList = (id: string | undefined) => useQuery({ ...shotListQuery(id ?? ''), enabled: !!id });

export function useSaveShotList(id: string | null) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateShotListInput | UpdateShotListInput) => (id ? updateShotList(id, input) : createShotList(input as CreateShotListInput)),
    onSuccess: (list) => {
      qc.setQueryData(shotListKeys.detail(list.id), list);
      return qc.invalidateQueries({ queryKey: shotListKeys.lists() });
    },
  });
}

/** `onChanged` lets the screen refresh the visit, which this feature does not own. */
export function useSetVisitShotList(visitId: string, onChanged?: () => unknown) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (shotListId: string) => setVisitShotList(visitId, shotListId),
    onSuccess: (list) => {
      qc.setQueryData(shotListKeys.detail(list.id), list);
      return onChanged?.();
    },
  });
}
