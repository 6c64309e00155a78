// Stakeholder lists (who a bulletin version can be sent to): TanStack Query hooks; keys built here only.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { StakeholderList, StakeholderListBody } from '../../shared/schemas/bulletins';
import { api } from './client';

export const stakeholderListKeys = {
  all: ['stakeholder-lists'] as const,
  lists: () => [...stakeholderListKeys.all, 'list'] as const,
};

export function useStakeholderLists(enabled = true) {
  return useQuery({
    queryKey: stakeholderListKeys.lists(),
    queryFn: async () => (await api<{ lists: StakeholderList[] }>('GET', '/api/stakeholder-lists')).lists,
    enabled,
  });
}

export function useCreateStakeholderList() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: StakeholderListBody) => api<StakeholderList>('POST', '/api/stakeholder-lists', body),
    onSuccess: () => qc.invalidateQueries({ queryKey: stakeholderListKeys.lists() }),
  });
}
