// A liaison's briefing inbox: what was sent to them, and acknowledging receipt. Keys built here only.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Briefing, BriefingDetail } from '../../shared/schemas/bulletins';
import { api } from './client';

export const briefingKeys = {
  all: ['briefings'] as const,
  lists: () => [...briefingKeys.all, 'list'] as const,
  detail: (id: number) => [...briefingKeys.all, 'detail', id] as const,
};

export function useBriefings() {
  return useQuery({
    queryKey: briefingKeys.lists(),
    queryFn: async () => (await api<{ briefings: Briefing[] }>('GET', '/api/briefings')).briefings,
  });
}

export function useBriefing(id: number) {
  return useQuery({ queryKey: briefingKeys.detail(id), queryFn: () => api<BriefingDetail>('GET', `/api/briefings/${id}`) });
}

export function useAcknowledgeBriefing(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (comment: string) => api<Briefing>('POST', `/api/briefings/${id}/acknowledge`, comment.trim() ? { comment: comment.trim() } : {}),
    onSuccess: (b) => {
      qc.setQueryData<BriefingDetail>(briefingKeys.detail(id), (old) => (old ? { ...old, ...b } : old));
      return qc.invalidateQueries({ queryKey: briefingKeys.lists() });
    },
  });
}

export const briefingPdfUrl = (id: number) => `/api/briefings/${id}/pdf`;
