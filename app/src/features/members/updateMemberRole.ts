// PATCH /api/projects/:projectId/members/:userId { role, version }. The last owner cannot be demoted (409).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { memberUpdateBodySchema } from '@contracts/api';
import { api } from '../../lib/api';
import { membersQuery } from './listMembers';
import { auditQuery } from '../projects/listAudit';

export type MemberUpdateBody = z.input<typeof memberUpdateBodySchema>;

export async function updateMemberRole(projectId: number, userId: number, body: MemberUpdateBody): Promise<void> {
  await api(`/api/projects/${projectId}/members/${userId}`, { method: 'PATCH', body });
}

export function useUpdateMemberRole(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: ({ userId, ...body }: MemberUpdateBody & { userId: number }) => updateMemberRole(projectId, userId, body),
    onSettled: async () => {
      await qc.invalidateQueries({ queryKey: membersQuery(projectId).queryKey });
      await qc.invalidateQueries({ queryKey: auditQuery(projectId).queryKey });
    },
  });
}
