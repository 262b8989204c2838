// DELETE /api/projects/:projectId/members/:userId. The last owner cannot be removed (409).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { membersQuery } from './listMembers';
import { auditQuery } from '../projects/listAudit';

export async function removeMember(projectId: number, userId: number): Promise<void> {
  await api(`/api/projects/${projectId}/members/${userId}`, { method: 'DELETE' });
}

export function useRemoveMember(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (userId: number) => removeMember(projectId, userId),
    onSettled: async () => {
      await qc.invalidateQueries({ queryKey: membersQuery(projectId).queryKey });
      await qc.invalidateQueries({ queryKey: auditQuery(projectId).queryKey });
    },
  });
}
