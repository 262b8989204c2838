// GET /api/projects/:projectId/designs: every design of the project, with its site count, version,
// last save and the worst relative boundary bound stored at save.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { designListSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export async function fetchDesigns(projectId: number, signal?: AbortSignal) {
  return (await api(`/api/projects/${projectId}/designs`, { signal }, designListSchema)).designs;
}

export const designsQuery = (projectId: number) =>
  queryOptions({
    // Under the project's key: refreshing the project refreshes its designs too.
    queryKey: [...projectQuery(projectId).queryKey, 'designs'] as const,
    queryFn: ({ signal }) => fetchDesigns(projectId, signal),
  });

export function useDesigns(projectId: number) {
  return useQuery(designsQuery(projectId));
}
