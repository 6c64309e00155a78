// Tracked objects and orbit-solution versions: TanStack Query hooks. Query keys are built here only
// (objectKeys); each mutation invalidates exactly what it changes.
import { keepPreviousData, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type {
  CompareResponse,
  CreateObjectBody,
  ObjectSort,
  ObjectListResponse,
  Solution,
  SolutionListResponse,
  TrackedObject,
  TrackedObjectKind,
  UpdateObjectBody,
} from '../../shared/schemas/objects';
import { api, ApiError, postForm } from './client';

/** The list request as the client builds it (the server validates with objectListQuerySchema). */
export interface ObjectListQuery {
  page: number;
  pageSize: number;
  sort: ObjectSort;
  q?: string;
  kind?: TrackedObjectKind;
  watch?: 'true' | 'false';
}

export const objectKeys = {
  all: ['objects'] as const,
  lists: () => [...objectKeys.all, 'list'] as const,
  list: (q: ObjectListQuery) => [...objectKeys.lists(), q] as const,
  detail: (id: number) => [...objectKeys.all, 'detail', id] as const,
  solutions: (id: number) => [...objectKeys.detail(id), 'solutions'] as const,
  solution: (id: number, version: number) => [...objectKeys.solutions(id), version] as const,
  compare: (id: number, a: number, b: number) => [...objectKeys.detail(id), 'compare', a, b] as const,
};

function queryString(q: ObjectListQuery): string {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== '' && v !== null) p.set(k, String(v));
  return p.toString();
}

export function useObjects(q: ObjectListQuery) {
  return useQuery({
    queryKey: objectKeys.list(q),
    queryFn: () => api<ObjectListResponse>('GET', `/api/objects?${queryString(q)}`),
    placeholderData: keepPreviousData,
  });
}

export function useObject(id: number) {
  return useQuery({ queryKey: objectKeys.detail(id), queryFn: () => api<TrackedObject>('GET', `/api/objects/${id}`) });
}

export function useSolutions(id: number) {
  return useQuery({
    queryKey: objectKeys.solutions(id),
    queryFn: async () => (await api<SolutionListResponse>('GET', `/api/objects/${id}/solutions`)).solutions,
  });
}

export function useSolution(id: number, version: number | null) {
  return useQuery({
    queryKey: objectKeys.solution(id, version ?? 0),
    queryFn: () => api<Solution>('GET', `/api/objects/${id}/solutions/${version}`),
    enabled: version !== null,
  });
}

export function useCompare(id: number, a: number | null, b: number | null) {
  return useQuery({
    queryKey: objectKeys.compare(id, a ?? 0, b ?? 0),
    queryFn: () => api<CompareResponse>('GET', `/api/objects/${id}/compare?a=${a}&b=${b}`),
    enabled: a !== null && b !== null && a !== b,
  });
}

export function useCreateObject() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: CreateObjectBody) => api<TrackedObject>('POST', '/api/objects', body),
    onSuccess: () => qc.invalidateQueries({ queryKey: objectKeys.lists() }),
  });
}

export function useUpdateObject(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (patch: UpdateObjectBody) => api<TrackedObject>('PATCH', `/api/objects/${id}`, patch),
    onSuccess: (obj) => {
      qc.setQueryData(objectKeys.detail(id), obj);
      return qc.invalidateQueries({ queryKey: objectKeys.lists() });
    },
  });
}

export type SolutionUpload =
  | { kind: 'file'; file: File; fields: Record<string, string> }
  | { kind: 'form'; body: Record<string, unknown> };

/** Multipart upload of an orbit solution file with its fit fields (blank fields are left out). */
function uploadSolutionFile(id: number, file: File, fields: Record<string, string>): Promise<Solution> {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) if (v.trim() !== '') form.append(k, v.trim());
  form.append('file', file, file.name);
  return postForm<Solution>(`/api/objects/${id}/solutions`, form);
}

export function useAddSolution(id: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (u: SolutionUpload) =>
      u.kind === 'file' ? uploadSolutionFile(id, u.file, u.fields) : api<Solution>('POST', `/api/objects/${id}/solutions`, u.body),
    onSuccess: () =>
      Promise.all([qc.invalidateQueries({ queryKey: objectKeys.detail(id) }), qc.invalidateQueries({ queryKey: objectKeys.lists() })]),
  });
}

/** The engine's issues of a refused upload ({where, message}), or [] for other errors. */
export function uploadIssues(error: unknown): { where: string; message: string }[] {
  if (!(error instanceof ApiError) || typeof error.details !== 'object' || error.details === null) return [];
  const issues = (error.details as { issues?: unknown }).issues;
  if (!Array.isArray(issues)) return [];
  return issues.map((i: { where?: unknown; in?: unknown; path?: unknown; message?: unknown }) => ({
    where: typeof i.where === 'string' ? i.where : `${String(i.in ?? '')} ${String(i.path ?? '')}`.trim(),
    message: String(i.message ?? ''),
  }));
}
