// A figure's value from a run as the client has it: the shared extraction (shared/bulletins/figures.ts), the same
// code the server uses for figure statuses and version snapshots.
import type { FigureValue, LinkedFigureAttrs } from '../../shared/bulletins/document';
import { tryExtractFigure } from '../../shared/bulletins/figures';
import type { Run } from '../../shared/schemas/runs';

export function previewFigure(run: Run, attrs: Pick<LinkedFigureAttrs, 'quantity' | 'body' | 'epochTdbJd'>): { value: FigureValue } | { error: string } {
  if (run.status !== 'done' || !run.result) return { error: `Run #${run.id} has no result (${run.status}).` };
  const r = tryExtractFigure(run.result, { runId: run.id, solutionId: run.solutionId, solutionVersion: run.solutionVersion, inputSha256: run.inputSha256 }, attrs);
  return r.value ? { value: r.value } : { error: r.problem };
}
