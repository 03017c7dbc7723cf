import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { IntegrityCheck, IntegrityOverview } from '../../../../server/features/integrity/integrity.schemas';
import { api } from '../../../lib/api-client';

export type { IntegrityCheck, IntegrityOverview };

export const integrityKeys = { all: ['integrity'] as const, overview: () => [...integrityKeys.all, 'overview'] as const };

export const integrityQuery = () => queryOptions({ queryKey: integrityKeys.overview(), queryFn: ({ signal }) => api<IntegrityOverview>('/api/integrity', { signal }) });
export const useIntegrity = () => useQuery(integrityQuery());

/** Walks every chain on the server; the heads may have moved meanwhile, so the overview is refetched. */
export function useCheckChains() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<IntegrityCheck>('/api/integrity/check', { method: 'POST' }),
    onSettled: () => qc.invalidateQueries({ queryKey: integrityKeys.all }),
  });
}
