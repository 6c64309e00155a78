// Users (admin): list, create or invite, change name/role, deactivate and reactivate.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { api } from './client';
import type { NewUserInput, UserPatch, UserRecord } from './types';

export const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
};

export function useUsers(enabled = true) {
  return useQuery({
    queryKey: userKeys.list(),
    queryFn: async () => (await api<{ users: UserRecord[] }>('GET', '/api/users')).users,
    enabled,
  });
}

export function useCreateUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (input: NewUserInput) => api<UserRecord | { user: UserRecord }>('POST', '/api/users', input),
    onSuccess: () => qc.invalidateQueries({ queryKey: userKeys.all }),
  });
}

export function useUpdateUser() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ id, patch }: { id: number; patch: UserPatch }) =>
      api<UserRecord | { user: UserRecord }>('PATCH', `/api/users/${id}`, patch),
    onSuccess: () => qc.invalidateQueries({ queryKey: userKeys.all }),
  });
}

export function useResendInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (id: number) => api<unknown>('POST', `/api/users/${id}/invitation`),
    onSuccess: () => qc.invalidateQueries({ queryKey: userKeys.all }),
  });
}
