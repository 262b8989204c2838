// GET /api/projects/:projectId/revisions/:revisionId → { revision } with its summary (revisions never change)
import { queryOptions, useQuery } from '@tanstack/react-query';
import { revisionResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export function fetchRevision(projectId: number, revisionId: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}/revisions/${revisionId}`, { signal }, revisionResponseSchema).then((r) => r.revision);
}

export const revisionQuery = (projectId: number, revisionId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'revision', revisionId] as const,
    queryFn: ({ signal }) => fetchRevision(projectId, revisionId, signal),
    staleTime: Infinity, // immutable rows
  });

export function useRevision(projectId: number, revisionId: number | null) {
  return useQuery({ ...revisionQuery(projectId, revisionId ?? 0), enabled: revisionId !== null });
}
