// The two figure sources. Live (a draft): the server's figure statuses from the last save (value, staleness, the
// newer run's value), and for a figure inserted or rebound since, the shared extraction over its run fetched here.
// Frozen (a locked version or a briefing): the version's snapshots; embedded tables and plots fetch their run
// when the user may read runs, else they point to the PDF.
import { useQuery } from '@tanstack/react-query';
import { useMemo } from 'react';
import type { LinkedFigureAttrs } from '../../shared/bulletins/document';
import type { FigureSnapshot, FigureStatus } from '../../shared/schemas/bulletins';
import type { Run } from '../../shared/schemas/runs';
import { api } from '../api/client';
import type { RunListResponse } from '../../shared/schemas/runs';
import { runKeys } from '../api/runs';
import { useAppAbility } from '../auth/useAppAbility';
import type { FigureLookup, FigureSource, RunResultLookup } from './FigureSource';
import { previewFigure } from './preview';

export function sameFigure(a: LinkedFigureAttrs, b: LinkedFigureAttrs): boolean {
  return a.runId === b.runId && a.quantity === b.quantity && (a.body ?? null) === (b.body ?? null) && (a.epochTdbJd ?? null) === (b.epochTdbJd ?? null);
}

/** One run's detail (shared cache with the run page), fetched only when enabled and the id is real. */
export function useRunQuery(runId: number, enabled: boolean) {
  return useQuery({
    queryKey: runKeys.detail(runId),
    queryFn: () => api<Run>('GET', `/api/runs/${runId}`),
    enabled: enabled && Number.isFinite(runId) && runId > 0,
    staleTime: 60_000,
  });
}

function useRunResultFrom(runId: number, enabled: boolean, refusal: string): RunResultLookup {
  const q = useRunQuery(runId, enabled);
  if (!enabled) return { state: 'missing', message: refusal };
  if (q.isPending) return { state: 'loading' };
  if (q.isError) return { state: 'missing', message: `Run #${runId} could not be loaded.` };
  if (!q.data.result) return { state: 'missing', message: `Run #${runId} has no result (${q.data.status}).` };
  return { state: 'ok', runId, result: q.data.result, run: q.data };
}

const RUNS_HIDDEN = 'The run behind this block is shown to analysts and reviewers; the PDF of each approved version includes it.';

export function useLiveFigureSource(objectId: number, statuses: FigureStatus[], editable: boolean): FigureSource {
  const canReadRuns = useAppAbility().can('read', 'Run');
  return useMemo<FigureSource>(
    () => ({
      editable,
      objectId,
      useFigure(attrs: LinkedFigureAttrs): FigureLookup {
        const status = statuses.find((s) => sameFigure(s.attrs, attrs));
        const run = useRunQuery(attrs.runId, !status && canReadRuns);
        if (status) {
          if (!status.value) return { state: 'missing', message: status.problem ?? 'No value' };
          return {
            state: 'ok',
            value: status.value,
            newer: status.stale && status.latestRunId !== null ? { runId: status.latestRunId, value: status.latestValue } : null,
          };
        }
        if (!canReadRuns) return { state: 'missing', message: 'Not saved yet' };
        if (run.isPending) return { state: 'loading' };
        if (run.isError) return { state: 'missing', message: `Run #${attrs.runId} could not be loaded.` };
        const p = previewFigure(run.data, attrs);
        if ('error' in p) return { state: 'missing', message: p.error };
        // Staleness of a figure inserted since the last save is known after the next autosave (about a second).
        return { state: 'ok', value: p.value, newer: null };
      },
      useRunResult(runId: number): RunResultLookup {
        return useRunResultFrom(runId, canReadRuns, RUNS_HIDDEN);
      },
      useNewerRun(runId: number): number | null {
        const runs = useQuery({
          queryKey: runKeys.forObject(objectId),
          queryFn: async () => (await api<RunListResponse>('GET', `/api/runs?objectId=${objectId}&limit=20`)).runs,
          enabled: editable && canReadRuns,
        });
        // newest first: the first finished run is the latest
        const latest = runs.data?.find((r) => r.status === 'done')?.id ?? null;
        return editable && latest !== null && latest > runId ? latest : null;
      },
    }),
    [objectId, statuses, editable, canReadRuns],
  );
}

export function useFrozenFigureSource(snapshots: FigureSnapshot[]): FigureSource {
  const ability = useAppAbility();
  const canReadRuns = ability.can('read', 'Run');
  return useMemo<FigureSource>(
    () => ({
      editable: false,
      objectId: null,
      useFigure(attrs: LinkedFigureAttrs): FigureLookup {
        const snap = snapshots.find((s) => sameFigure(s.attrs, attrs));
        return snap ? { state: 'ok', value: snap.value, newer: null } : { state: 'missing', message: 'This figure has no snapshot in the version.' };
      },
      useRunResult(runId: number): RunResultLookup {
        return useRunResultFrom(runId, canReadRuns, RUNS_HIDDEN);
      },
      useNewerRun: () => null,
    }),
    [snapshots, canReadRuns],
  );
}
