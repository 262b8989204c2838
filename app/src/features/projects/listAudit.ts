// GET /api/projects/:projectId/audit: who did what in this project, newest first.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { auditListSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from './getProject';

export async function fetchAudit(projectId: number, signal?: AbortSignal) {
  return (await api(`/api/projects/${projectId}/audit`, { signal }, auditListSchema)).entries;
}

export const auditQuery = (projectId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'audit'] as const,
    queryFn: ({ signal }) => fetchAudit(projectId, signal),
  });

export function useAudit(projectId: number, enabled = true) {
  return useQuery({ ...auditQuery(projectId), enabled });
}
