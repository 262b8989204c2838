// GET /api/projects/:projectId/revisions?designId= → { revisions } (without summaries) newest first
import { queryOptions, useQuery } from '@tanstack/react-query';
import { revisionListSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export function fetchRevisions(projectId: number, designId: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}/revisions?designId=${designId}`, { signal }, revisionListSchema).then((r) => r.revisions);
}

export const revisionsQuery = (projectId: number, designId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'revisions', { designId }] as const,
    queryFn: ({ signal }) => fetchRevisions(projectId, designId, signal),
  });

export function useRevisions(projectId: number, designId: number) {
  return useQuery(revisionsQuery(projectId, designId));
}
