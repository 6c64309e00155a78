// Where the editor's figure nodes get their values. A bulletin draft reads them live from the runs
// (shared figure extraction over each run's engine JSON, with the object's newest run for staleness); a locked
// version reads them from its frozen snapshots. Node views only call the hooks of the source in context.
import { createContext, useContext } from 'react';
import type { FigureValue, LinkedFigureAttrs } from '../../shared/bulletins/document';
import type { Run } from '../../shared/schemas/runs';

export type FigureLookup =
  | { state: 'loading' }
  | { state: 'missing'; message: string }
  | {
      state: 'ok';
      value: FigureValue;
      /** Set when a newer run of the object exists: its value for the same quantity and approach (null when none matches). */
      newer: { runId: number; value: FigureValue | null } | null;
    };

export type RunResultLookup =
  | { state: 'loading' }
  | { state: 'missing'; message: string }
  | { state: 'ok'; runId: number; result: Record<string, unknown>; run: Run };

export interface FigureSource {
  /** Whether the figures may be rebound or edited (a draft the user may write). */
  editable: boolean;
  /** The tracked object the bulletin is about (null for a frozen version). */
  objectId: number | null;
  useFigure(attrs: LinkedFigureAttrs): FigureLookup;
  useRunResult(runId: number): RunResultLookup;
  /** The object's newest finished run when it is newer than `runId` (drafts only; null otherwise). */
  useNewerRun(runId: number): number | null;
}

const EMPTY: FigureSource = {
  editable: false,
  objectId: null,
  useFigure: () => ({ state: 'missing', message: 'No figure source' }),
  useRunResult: () => ({ state: 'missing', message: 'No figure source' }),
  useNewerRun: () => null,
};

export const FigureSourceContext = createContext<FigureSource>(EMPTY);

export function useFigureSource(): FigureSource {
  return useContext(FigureSourceContext);
}

/** The node's attributes as the shared schema types them (TipTap stores them untyped). */
export function figureAttrs(attrs: Record<string, unknown>): LinkedFigureAttrs {
  return {
    runId: Number(attrs.runId),
    quantity: attrs.quantity as LinkedFigureAttrs['quantity'],
    body: (attrs.body as string | null) ?? null,
    epochTdbJd: attrs.epochTdbJd === null || attrs.epochTdbJd === undefined ? null : Number(attrs.epochTdbJd),
  };
}
