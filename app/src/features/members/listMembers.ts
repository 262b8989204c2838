// GET /api/projects/:projectId/members
import { queryOptions, useQuery } from '@tanstack/react-query';
import { memberListSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export async function fetchMembers(projectId: number, signal?: AbortSignal) {
  return (await api(`/api/projects/${projectId}/members`, { signal }, memberListSchema)).members;
}

export const membersQuery = (projectId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'members'] as const,
    queryFn: ({ signal }) => fetchMembers(projectId, signal),
  });

export function useMembers(projectId: number, enabled = true) {
  return useQuery({ ...membersQuery(projectId), enabled });
}
