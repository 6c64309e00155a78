// Bulletins and their locked versions: TanStack Query hooks. Query keys are built here only (bulletinKeys); each
// mutation invalidates exactly what it changes. A draft save carries the revision it edits; the server answers 409
// with the stored copy when someone saved in between (see saveConflict).
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  Bulletin,
  BulletinListQuery,
  BulletinListResponse,
  BulletinVersionDetail,
  CreateBulletinBody,
  TransitionBody,
  UpdateBulletinBody,
  VersionListResponse,
} from '../../shared/schemas/bulletins';
import { api, ApiError } from './client';

export const bulletinKeys = {
  all: ['bulletins'] as const,
  lists: () => [...bulletinKeys.all, 'list'] as const,
  list: (q: BulletinListQuery) => [...bulletinKeys.lists(), q] as const,
  detail: (id: number) => [...bulletinKeys.all, 'detail', id] as const,
  versions: (id: number) => [...bulletinKeys.detail(id), 'versions'] as const,
  version: (id: number, version: number, against: number | null) => [...bulletinKeys.versions(id), version, { against }] as const,
};

function queryString(q: BulletinListQuery): string {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== null && v !== '') p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : '';
}

export function useBulletins(q: BulletinListQuery = {}) {
  return useQuery({
    queryKey: bulletinKeys.list(q),
    queryFn: async () => (await api<BulletinListResponse>('GET', `/api/bulletins${queryString(q)}`)).bulletins,
  });
}

export function useBulletin(id: number) {
  return useQuery({
    queryKey: bulletinKeys.detail(id),
    queryFn: () => api<Bulletin>('GET', `/api/bulletins/${id}`),
    // The editor owns the draft while it is open: a background refetch must not replace what is being typed.
    refetchOnWindowFocus: false,
  });
}

export function useCreateBulletin() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateBulletinBody) => api<Bulletin>('POST', '/api/bulletins', body),
    onSuccess: (b) => {
      qc.setQueryData(bulletinKeys.detail(b.id), b);
      return qc.invalidateQueries({ queryKey: bulletinKeys.lists() });
    },
  });
}

/** The stored copy a 409 answer carries, or null when the error is not a save conflict. */
export function saveConflict(error: unknown): Bulletin | null {
  if (!(error instanceof ApiError) || error.status !== 409) return null;
  const current = (error.details as { current?: Bulletin } | null | undefined)?.current;
  return current && typeof current === 'object' && 'revision' in current ? current : null;
}

/**
 * Save the draft. The cache entry is updated with the answer (the new revision and the server's figure statuses);
 * lists only show title, state and dates, so they are invalidated too.
 */
export function useSaveBulletin(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateBulletinBody) => api<Bulletin>('PUT', `/api/bulletins/${id}`, body),
    onSuccess: (b) => {
      qc.setQueryData(bulletinKeys.detail(id), b);
      return qc.invalidateQueries({ queryKey: bulletinKeys.lists() });
    },
  });
}

/** A workflow transition. Approval creates a version, so the version list is refreshed with the bulletin. */
export function useTransition(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: TransitionBody) => api<Bulletin>('POST', `/api/bulletins/${id}/transitions`, body),
    onSuccess: (b) => {
      qc.setQueryData(bulletinKeys.detail(id), b);
      return Promise.all([qc.invalidateQueries({ queryKey: bulletinKeys.lists() }), qc.invalidateQueries({ queryKey: bulletinKeys.versions(id) })]);
    },
    // 409: someone else moved the bulletin on (e.g. a second reviewer approved first): show its state now.
    onError: (e) => {
      if (e instanceof ApiError && e.status === 409) return qc.invalidateQueries({ queryKey: bulletinKeys.detail(id) });
    },
  });
}

export function useVersions(id: number) {
  return useQuery({
    queryKey: bulletinKeys.versions(id),
    queryFn: async () => (await api<VersionListResponse>('GET', `/api/bulletins/${id}/versions`)).versions,
  });
}

export function useVersion(id: number, version: number | null, against: number | null = null) {
  return useQuery({
    queryKey: bulletinKeys.version(id, version ?? 0, against),
    queryFn: () => api<BulletinVersionDetail>('GET', `/api/bulletins/${id}/versions/${version}${against ? `?against=${against}` : ''}`),
    enabled: version !== null && version > 0,
    staleTime: Infinity, // a locked version never changes (only its status, shown from the list)
  });
}

export const versionPdfUrl = (id: number, version: number) => `/api/bulletins/${id}/versions/${version}/pdf`;
