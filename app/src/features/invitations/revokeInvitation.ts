// DELETE /api/projects/:projectId/invitations/:invitationId: the e-mailed link stops working.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { invitationsQuery } from './listInvitations';
import { auditQuery } from '../projects/listAudit';

export async function revokeInvitation(projectId: number, invitationId: number): Promise<void> {
  await api(`/api/projects/${projectId}/invitations/${invitationId}`, { method: 'DELETE' });
}

export function useRevokeInvitation(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (invitationId: number) => revokeInvitation(projectId, invitationId),
    onSettled: async () => {
      await qc.invalidateQueries({ queryKey: invitationsQuery(projectId).queryKey });
      await qc.invalidateQueries({ queryKey: auditQuery(projectId).queryKey });
    },
  });
}
