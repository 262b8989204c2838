// POST /api/projects/:projectId/invitations { email, role }: the server e-mails a link to the address.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { invitationCreateBodySchema } from '@contracts/api';
import { api } from '../../lib/api';
import { invitationsQuery } from './listInvitations';
import { auditQuery } from '../projects/listAudit';

export type InvitationCreateBody = z.input<typeof invitationCreateBodySchema>;

export async function createInvitation(projectId: number, body: InvitationCreateBody): Promise<void> {
  await api(`/api/projects/${projectId}/invitations`, { method: 'POST', body });
}

export function useCreateInvitation(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: InvitationCreateBody) => createInvitation(projectId, body),
    onSuccess: async () => {
      await qc.invalidateQueries({ queryKey: invitationsQuery(projectId).queryKey });
      await qc.invalidateQueries({ queryKey: auditQuery(projectId).queryKey });
    },
  });
}
