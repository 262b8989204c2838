// GET /api/projects/:projectId/invitations: invitations sent and not yet accepted.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { invitationListSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export async function fetchInvitations(projectId: number, signal?: AbortSignal) {
  return (await api(`/api/projects/${projectId}/invitations`, { signal }, invitationListSchema)).invitations;
}

export const invitationsQuery = (projectId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'invitations'] as const,
    queryFn: ({ signal }) => fetchInvitations(projectId, signal),
  });

export function useInvitations(projectId: number, enabled = true) {
  return useQuery({ ...invitationsQuery(projectId), enabled });
}
