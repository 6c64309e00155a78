// Press releases (issue 7): TanStack Query hooks over /api/releases. Query keys are built here only (releaseKeys);
// each mutation invalidates exactly what it changes. A draft save carries the revision it edits (409 with the stored
// copy when someone saved in between, see releaseSaveConflict). A scheduled release is polled so its page shows the
// publication when the scheduler makes it.
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ReleaseState } from '../../shared/releases/workflow';
import type {
  CreateReleaseBody,
  Release,
  ReleaseListResponse,
  ReleaseTransitionBody,
  ReleaseVersion,
  UpdateReleaseBody,
} from '../../shared/schemas/releases';
import type { VersionListResponse } from '../../shared/schemas/bulletins';
import { bulletinKeys } from './bulletins';
import { api, ApiError } from './client';

export const releaseKeys = {
  all: ['releases'] as const,
  lists: () => [...releaseKeys.all, 'list'] as const,
  list: (state: ReleaseState | '') => [...releaseKeys.lists(), { state }] as const,
  detail: (id: number) => [...releaseKeys.all, 'detail', id] as const,
  version: (id: number, version: number) => [...releaseKeys.detail(id), 'version', version] as const,
};

/** Poll period of a scheduled release whose time has come (the scheduler publishes it within a second or so). */
export const RELEASE_DUE_POLL_MS = 1000;
/** Poll period of a scheduled release whose time is further away. */
export const RELEASE_SCHEDULED_POLL_MS = 15_000;

export function releasePollMs(r: Pick<Release, 'state' | 'publication'> | undefined, nowMs = Date.now()): number | false {
  if (!r || r.state !== 'scheduled' || !r.publication.publishAt) return false;
  const due = Date.parse(r.publication.publishAt);
  return due - nowMs < 60_000 ? RELEASE_DUE_POLL_MS : RELEASE_SCHEDULED_POLL_MS;
}

export function useReleases(state: ReleaseState | '' = '') {
  return useQuery({
    queryKey: releaseKeys.list(state),
    queryFn: async () => (await api<ReleaseListResponse>('GET', `/api/releases${state ? `?state=${state}` : ''}`)).releases,
    // scheduled rows turn into published ones without anyone acting
    refetchInterval: (q) => {
      const rows = q.state.data ?? [];
      const polls = rows.map((r) => releasePollMs(r)).filter((p): p is number => p !== false);
      return polls.length ? Math.min(...polls) : false;
    },
  });
}

export function useRelease(id: number) {
  return useQuery({
    queryKey: releaseKeys.detail(id),
    queryFn: () => api<Release>('GET', `/api/releases/${id}`),
    // the editor owns the draft while it is open: a background refetch must not replace what is being typed
    refetchOnWindowFocus: false,
    refetchInterval: (q) => releasePollMs(q.state.data),
  });
}

export function useReleaseVersion(id: number, version: number | null) {
  return useQuery({
    queryKey: releaseKeys.version(id, version ?? 0),
    queryFn: () => api<ReleaseVersion>('GET', `/api/releases/${id}/versions/${version}`),
    enabled: version !== null && version > 0,
    staleTime: Infinity, // a locked wording never changes
  });
}

export function useCreateRelease() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateReleaseBody) => api<Release>('POST', '/api/releases', body),
    onSuccess: (r) => {
      qc.setQueryData(releaseKeys.detail(r.id), r);
      return qc.invalidateQueries({ queryKey: releaseKeys.lists() });
    },
  });
}

/** The stored copy a 409 answer carries, or null when the error is not a save conflict. */
export function releaseSaveConflict(error: unknown): Release | null {
  if (!(error instanceof ApiError) || error.status !== 409) return null;
  const current = (error.details as { current?: Release } | null | undefined)?.current;
  return current && typeof current === 'object' && 'revision' in current ? current : null;
}

export function useSaveRelease(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: UpdateReleaseBody) => api<Release>('PUT', `/api/releases/${id}`, body),
    onSuccess: (r) => {
      qc.setQueryData(releaseKeys.detail(id), r);
      return qc.invalidateQueries({ queryKey: releaseKeys.lists() });
    },
  });
}

/** A workflow action (submit, review, schedule, reschedule, unschedule, amend, cancel). */
export function useReleaseTransition(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ReleaseTransitionBody) => api<Release>('POST', `/api/releases/${id}/transitions`, body),
    onSuccess: (r) => {
      qc.setQueryData(releaseKeys.detail(id), r);
      return qc.invalidateQueries({ queryKey: releaseKeys.lists() });
    },
  });
}

/**
 * The locked versions of a bulletin, for choosing the one a release starts from (same cache entry as the bulletin
 * page's version list; nothing is fetched before a bulletin is chosen).
 */
export function useBulletinVersionsFor(bulletinId: number | null) {
  return useQuery({
    queryKey: bulletinKeys.versions(bulletinId ?? 0),
    queryFn: async () => (await api<VersionListResponse>('GET', `/api/bulletins/${bulletinId}/versions`)).versions,
    enabled: bulletinId !== null && bulletinId > 0,
  });
}

/** The public page of a published release (served by the server, no sign-in). */
export const publicReleaseUrl = (slug: string) => `/public/releases/${encodeURIComponent(slug)}`;
export const PUBLIC_SITE_URL = '/public';
export const PUBLIC_FEED_URL = '/public/feed.atom';
