// GET /api/projects/:projectId/designs/:designId → { design: { id, name, document, version, updatedAt, updatedBy } }
import { queryOptions, useQuery } from '@tanstack/react-query';
import { designResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export function fetchDesign(projectId: number, designId: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}/designs/${designId}`, { signal }, designResponseSchema).then((r) => r.design);
}

export const designQuery = (projectId: number, designId: number) =>
  queryOptions({
    // under the project's key, so refreshing a project refreshes its open designs too
    queryKey: [...projectQuery(projectId).queryKey, 'designs', designId] as const,
    queryFn: ({ signal }) => fetchDesign(projectId, designId, signal),
    // the workspace holds the edited copy; refetching in the background would only be noise
    staleTime: Infinity,
    refetchOnWindowFocus: false,
  });

export function useDesign(projectId: number, designId: number) {
  return useQuery(designQuery(projectId, designId));
}
