// Assessment runs: TanStack Query hooks. Query keys are built here only (runKeys); a run that is queued or
// running is polled every second until it finishes, then the object's summary is refreshed once.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { FINISHED_RUN_STATUSES, type CreateRunBody, type Run, type RunListResponse, type RunStatus } from '../../shared/schemas/runs';
import { api } from './client';
import { objectKeys } from './objects';

export const runKeys = {
  all: ['runs'] as const,
  lists: () => [...runKeys.all, 'list'] as const,
  forObject: (objectId: number) => [...runKeys.lists(), { objectId }] as const,
  detail: (id: number) => [...runKeys.all, 'detail', id] as const,
};

/** Poll period while a run is queued or running. */
export const RUN_POLL_MS = 1000;

export const isFinished = (status: RunStatus) => FINISHED_RUN_STATUSES.includes(status);

export function useObjectRuns(objectId: number) {
  return useQuery({
    queryKey: runKeys.forObject(objectId),
    queryFn: async () => (await api<RunListResponse>('GET', `/api/runs?objectId=${objectId}&limit=20`)).runs,
    // keep the list's statuses moving while any run of the object is unfinished
    refetchInterval: (q) => (q.state.data?.some((r) => !isFinished(r.status)) ? RUN_POLL_MS : false),
  });
}

export function useRun(id: number) {
  const qc = useQueryClient();
  return useQuery({
    queryKey: runKeys.detail(id),
    queryFn: async () => {
      const run = await api<Run>('GET', `/api/runs/${id}`);
      const before = qc.getQueryData<Run>(runKeys.detail(id));
      if (isFinished(run.status) && before && !isFinished(before.status)) {
        // just finished: the object's summary columns and run list changed
        void qc.invalidateQueries({ queryKey: objectKeys.detail(run.objectId) });
        void qc.invalidateQueries({ queryKey: objectKeys.lists() });
        void qc.invalidateQueries({ queryKey: runKeys.lists() });
      }
      return run;
    },
    refetchInterval: (q) => (q.state.data && isFinished(q.state.data.status) ? false : RUN_POLL_MS),
  });
}

export function useCreateRun() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateRunBody) => api<Run>('POST', '/api/runs', body),
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(run.id), run);
      return qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}

export function useCancelRun(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<Run>('DELETE', `/api/runs/${id}`),
    onSuccess: (run) => {
      qc.setQueryData(runKeys.detail(id), run);
      return qc.invalidateQueries({ queryKey: runKeys.lists() });
    },
  });
}
