// Orbit determination (issue 8): observatories, astrometry per object and orbit-fit jobs. TanStack Query hooks;
// query keys are built here only (odKeys). A fit that is queued or running is polled every second until it
// finishes; adopting a fit adds a solution version, so the object's versions are refreshed.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AdesIssue, FitSettingsInput, ObservatoryInput } from '../../shared/schemas/od';
import type {
  AdoptFitBody,
  AstrometryList,
  FitJob,
  ImportObservatoriesResult,
  ObservatoryImportMode,
  ObservatoryRow,
  UploadAstrometryResult,
} from '../../shared/schemas/odApi';
import { FINISHED_RUN_STATUSES } from '../../shared/schemas/runs';
import { api, ApiError, postForm } from './client';
import { objectKeys } from './objects';

export const odKeys = {
  observatories: ['observatories'] as const,
  astrometry: (objectId: number) => ['astrometry', objectId] as const,
  fits: ['fits'] as const,
  fitLists: () => [...odKeys.fits, 'list'] as const,
  fitsForObject: (objectId: number) => [...odKeys.fitLists(), { objectId }] as const,
  fit: (id: number) => [...odKeys.fits, 'detail', id] as const,
};

/** Poll period while a fit is queued or running. */
export const FIT_POLL_MS = 1000;

export const isFitFinished = (status: FitJob['status']) => FINISHED_RUN_STATUSES.includes(status);

// --- observatories ----------------------------------------------------------------------------------------------

export function useObservatories() {
  return useQuery({
    queryKey: odKeys.observatories,
    queryFn: async () => {
      const body = await api<{ observatories: ObservatoryRow[] } | ObservatoryRow[]>('GET', '/api/observatories');
      return Array.isArray(body) ? body : body.observatories;
    },
  });
}

export function useSaveObservatory() {
  const qc = useQueryClient();
  return useMutation({
    /** `code` of the row being edited, or null to add one. */
    mutationFn: ({ code, body }: { code: string | null; body: ObservatoryInput }) =>
      code === null ? api<ObservatoryRow>('POST', '/api/observatories', body) : api<ObservatoryRow>('PUT', `/api/observatories/${encodeURIComponent(code)}`, body),
    onSuccess: () => qc.invalidateQueries({ queryKey: odKeys.observatories }),
  });
}

/** Import a file of observatories: a chosen file as multipart (field `file`, plus `mode`), pasted text as JSON. */
export function useImportObservatories() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ source, mode }: { source: { kind: 'file'; file: File } | { kind: 'text'; text: string }; mode: ObservatoryImportMode }) => {
      if (source.kind === 'text') return api<ImportObservatoriesResult>('POST', '/api/observatories/import', { text: source.text, mode });
      const form = new FormData();
      form.append('mode', mode);
      form.append('file', source.file, source.file.name);
      return postForm<ImportObservatoriesResult>('/api/observatories/import', form);
    },
    onSuccess: () => qc.invalidateQueries({ queryKey: odKeys.observatories }),
  });
}

export function useDeleteObservatory() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (code: string) => api<void>('DELETE', `/api/observatories/${encodeURIComponent(code)}`),
    onSuccess: () => qc.invalidateQueries({ queryKey: odKeys.observatories }),
  });
}

// --- astrometry -------------------------------------------------------------------------------------------------

export function useAstrometry(objectId: number, opts: { enabled?: boolean } = {}) {
  return useQuery({
    queryKey: odKeys.astrometry(objectId),
    queryFn: () => api<AstrometryList>('GET', `/api/objects/${objectId}/astrometry`),
    enabled: opts.enabled ?? true,
  });
}

/**
 * The line-numbered issues of a refused ADES file (422 INVALID_ASTROMETRY carries them in `details.issues`);
 * [] for any other error.
 */
export function astrometryIssues(error: unknown): AdesIssue[] {
  if (!(error instanceof ApiError)) return [];
  const d = error.details as unknown;
  const list = Array.isArray(d) ? d : typeof d === 'object' && d !== null && Array.isArray((d as { issues?: unknown }).issues) ? (d as { issues: unknown[] }).issues : [];
  return list.filter(
    (i): i is AdesIssue => typeof i === 'object' && i !== null && typeof (i as AdesIssue).line === 'number' && typeof (i as AdesIssue).message === 'string',
  ).map((i) => ({ line: i.line, field: i.field ?? null, message: i.message }));
}

/** A file goes as multipart (field `file`, up to 5 MB; the JSON body limit of the API is lower), pasted text as JSON. */
function uploadAstrometryFile(objectId: number, file: File): Promise<UploadAstrometryResult> {
  const form = new FormData();
  form.append('file', file, file.name);
  return postForm<UploadAstrometryResult>(`/api/objects/${objectId}/astrometry`, form);
}

export type AstrometryUpload = { kind: 'file'; file: File } | { kind: 'text'; text: string };

export function useUploadAstrometry(objectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: AstrometryUpload) =>
      u.kind === 'file' ? uploadAstrometryFile(objectId, u.file) : api<UploadAstrometryResult>('POST', `/api/objects/${objectId}/astrometry`, { text: u.text }),
    onSuccess: () => qc.invalidateQueries({ queryKey: odKeys.astrometry(objectId) }),
  });
}

export function useExcludeObservation(objectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ obsId, excluded, reason }: { obsId: number; excluded: boolean; reason?: string }) =>
      api<unknown>('PATCH', `/api/objects/${objectId}/astrometry/${obsId}`, reason === undefined ? { excluded } : { excluded, reason }),
    onSuccess: () => qc.invalidateQueries({ queryKey: odKeys.astrometry(objectId) }),
  });
}

// --- fits -------------------------------------------------------------------------------------------------------

export function useObjectFits(objectId: number, opts: { enabled?: boolean } = {}) {
  return useQuery({
    queryKey: odKeys.fitsForObject(objectId),
    enabled: opts.enabled ?? true,
    queryFn: async () => (await api<{ fits: FitJob[] }>('GET', `/api/objects/${objectId}/fits`)).fits,
    refetchInterval: (q) => (q.state.data?.some((f) => !isFitFinished(f.status)) ? FIT_POLL_MS : false),
  });
}

export function useFit(id: number, opts: { enabled?: boolean } = {}) {
  const qc = useQueryClient();
  return useQuery({
    queryKey: odKeys.fit(id),
    enabled: opts.enabled ?? true,
    queryFn: async () => {
      const fit = await api<FitJob>('GET', `/api/fits/${id}`);
      const before = qc.getQueryData<FitJob>(odKeys.fit(id));
      if (isFitFinished(fit.status) && before && !isFitFinished(before.status)) void qc.invalidateQueries({ queryKey: odKeys.fitLists() });
      return fit;
    },
    refetchInterval: (q) => (q.state.data && isFitFinished(q.state.data.status) ? false : FIT_POLL_MS),
  });
}

export function useCreateFit(objectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: FitSettingsInput) => api<FitJob>('POST', `/api/objects/${objectId}/fits`, body),
    onSuccess: (fit) => {
      qc.setQueryData(odKeys.fit(fit.id), fit);
      return qc.invalidateQueries({ queryKey: odKeys.fitLists() });
    },
  });
}

export function useCancelFit(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => api<FitJob | undefined>('DELETE', `/api/fits/${id}`),
    onSuccess: () => Promise.all([qc.invalidateQueries({ queryKey: odKeys.fit(id) }), qc.invalidateQueries({ queryKey: odKeys.fitLists() })]),
  });
}

export function useAdoptFit(fit: { id: number; objectId: number }) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: AdoptFitBody) => api<{ solutionId: number; version: number }>('POST', `/api/fits/${fit.id}/adopt`, body),
    onSuccess: () =>
      Promise.all([
        qc.invalidateQueries({ queryKey: odKeys.fit(fit.id) }),
        qc.invalidateQueries({ queryKey: odKeys.fitLists() }),
        qc.invalidateQueries({ queryKey: objectKeys.detail(fit.objectId) }),
        qc.invalidateQueries({ queryKey: objectKeys.lists() }),
      ]),
  });
}
