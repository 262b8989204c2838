// GET /api/projects/:projectId/designs/:designId/versions/:version → { version } with its document: the design a
// revision was computed from (sites for the mesh viewer's distances and the bond graph, the comparison of two runs).
import { queryOptions, useQuery } from '@tanstack/react-query';
import { designVersionResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export function fetchDesignVersion(projectId: number, designId: number, version: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}/designs/${designId}/versions/${version}`, { signal }, designVersionResponseSchema).then((r) => r.version);
}

export const designVersionQuery = (projectId: number, designId: number, version: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'design', designId, 'version', version] as const,
    queryFn: ({ signal }) => fetchDesignVersion(projectId, designId, version, signal),
    staleTime: Infinity, // design versions never change
  });

export function useDesignVersion(projectId: number, designId: number, version: number) {
  return useQuery(designVersionQuery(projectId, designId, version));
}
