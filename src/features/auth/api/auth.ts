import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api, ApiError, resetCsrf } from '../../../lib/api-client';
import type { LoginInput } from '../../../../server/features/auth/auth.schemas';
import type { Me } from '../types';

export const authKeys = { all: ['auth'] as const, me: () => [...authKeys.all, 'me'] as const };

/** The signed-in user, or null when nobody is signed in. */
export async function getMe({ signal }: { signal?: AbortSignal } = {}): Promise<Me | null> {
  try {
    return await api<Me>('/api/auth/me', { signal });
  } catch (e) {
    if (e instanceof ApiError && (e.status === 401 || e.status === 403)) return null;
    throw e;
  }
}

export const meQuery = () => queryOptions({ queryKey: authKeys.me(), queryFn: ({ signal }) => getMe({ signal }), staleTime: 60_000 });

export const useMe = () => useQuery(meQuery());

export function useLogin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: async (input: LoginInput) => {
      resetCsrf();
      const me = await api<Me>('/api/auth/login', { method: 'POST', body: input });
      resetCsrf();
      return me;
    },
    onSuccess: (me) => {
      qc.clear();
      qc.setQueryData(authKeys.me(), me);
    },
  });
}

/** Signs out here; with `everywhere`, ends this user's sessions on every device too. */
export function useLogout() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (opts?: { everywhere?: boolean }) => api<void>(opts?.everywhere ? '/api/auth/sessions/end' : '/api/auth/logout', { method: 'POST' }),
    onSettled: () => {
      resetCsrf();
      qc.clear();
      qc.setQueryData(authKeys.me(), null);
    },
  });
}
