// GET /api/projects/:projectId/design: the project's design document and its version.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { projectDesignSchema } from '@contracts/api';
import { api, ApiError } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

/** null when the project has no design saved yet (404). */
export async function fetchDesign(projectId: number, signal?: AbortSignal) {
  try {
    return await api(`/api/projects/${projectId}/design`, { signal }, projectDesignSchema);
  } catch (err) {
    if (err instanceof ApiError && err.status === 404) return null;
    throw err;
  }
}

export const designQuery = (projectId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'design'] as const,
    queryFn: ({ signal }) => fetchDesign(projectId, signal),
  });

export function useDesign(projectId: number) {
  return useQuery(designQuery(projectId));
}
