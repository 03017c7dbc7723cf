import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from '../../../lib/api-client';
import type { CreateUserInput, UpdateUserInput } from '../../../../server/features/users/users.schemas';
import type { StaffUser } from '../types';

export const userKeys = {
  all: ['users'] as const,
  lists: () => [...userKeys.all, 'list'] as const,
};

export const getUsers = (signal?: AbortSignal) => api<StaffUser[]>('/api/users', { signal });
export const createUser = (input: CreateUserInput) => api<StaffUser>('/api/users', { method: 'POST', body: input });
export const updateUser = (id: string, input: UpdateUserInput) => api<StaffUser>(`/api/users/${id}`, { method: 'PATCH', body: input });
export const endUserSessions = (id: string) => api<void>(`/api/users/${id}/sessions/end`, { method: 'POST' });
export const unlockUser = (id: string) => api<void>(`/api/users/${id}/unlock`, { method: 'POST' });
export const resetUserPassword = (id: string, password: string) => api<void>(`/api/users/${id}/password`, { method: 'POST', body: { password } });

export const usersQuery = () => queryOptions({ queryKey: userKeys.lists(), queryFn: ({ signal }) => getUsers(signal) });
export const useUsers = () => useQuery(usersQuery());

function useInvalidatingMutation<TVars, TOut>(fn: (v: TVars) => Promise<TOut>) {
  const qc = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => qc.invalidateQueries({ queryKey: userKeys.lists() }) });
}

export const useCreateUser = () => useInvalidatingMutation(createUser);
export const useUpdateUser = () => useInvalidatingMutation(({ id, ...input }: UpdateUserInput & { id: string }) => updateUser(id, input));
export const useEndUserSessions = () => useMutation({ mutationFn: endUserSessions });
export const useUnlockUser = () => useMutation({ mutationFn: unlockUser });
export const useResetPassword = () => useMutation({ mutationFn: ({ id, password }: { id: string; password: string }) => resetUserPassword(id, password) });
