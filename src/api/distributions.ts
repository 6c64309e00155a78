// Distributions (a locked bulletin version sent to a stakeholder list) with per-recipient delivery and
// acknowledgement: TanStack Query hooks; keys built here only. While a delivery is pending the list is polled.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { CreateDistributionBody, Distribution } from '../../shared/schemas/bulletins';
import { bulletinKeys } from './bulletins';
import { api } from './client';

export const distributionKeys = {
  all: ['distributions'] as const,
  lists: () => [...distributionKeys.all, 'list'] as const,
  forBulletin: (bulletinId: number) => [...distributionKeys.lists(), { bulletinId }] as const,
};

export const DISTRIBUTION_POLL_MS = 2000;

export function useDistributions(bulletinId: number, enabled = true) {
  return useQuery({
    queryKey: distributionKeys.forBulletin(bulletinId),
    queryFn: async () => (await api<{ distributions: Distribution[] }>('GET', `/api/distributions?bulletinId=${bulletinId}`)).distributions,
    enabled,
    refetchInterval: (q) => (q.state.data?.some((d) => d.counts.pending > 0) ? DISTRIBUTION_POLL_MS : false),
  });
}

/** Send a version to a list. The bulletin's state moves to distributed, so its detail and lists are refreshed. */
export function useCreateDistribution() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateDistributionBody) => api<Distribution>('POST', '/api/distributions', body),
    onSuccess: (d) =>
      Promise.all([
        qc.invalidateQueries({ queryKey: distributionKeys.forBulletin(d.bulletinId) }),
        qc.invalidateQueries({ queryKey: bulletinKeys.detail(d.bulletinId), exact: true }),
        qc.invalidateQueries({ queryKey: bulletinKeys.versions(d.bulletinId) }),
        qc.invalidateQueries({ queryKey: bulletinKeys.lists() }),
      ]),
  });
}
