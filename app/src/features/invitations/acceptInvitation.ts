// POST /api/invitations/:token/accept: the signed-in user (whose e-mail the invitation names) joins.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { api } from '../../lib/api';
import { projectsQuery } from '../projects/listProjects';

// The contract does not fix this answer's envelope; find the joined project's id where it may be.
const joinedAnswer = z.union([
  z.object({ projectId: z.number().int() }).transform((a) => a.projectId),
  z.object({ project: z.object({ id: z.number().int() }) }).transform((a) => a.project.id),
  z.object({ membership: z.object({ projectId: z.number().int() }) }).transform((a) => a.membership.projectId),
  z.unknown().transform(() => null),
]);

/** Resolves to the joined project's id, or null when the server did not say. */
export function acceptInvitation(token: string): Promise<number | null> {
  return api(`/api/invitations/${encodeURIComponent(token)}/accept`, { method: 'POST' }, joinedAnswer);
}

export function useAcceptInvitation() {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: acceptInvitation,
    onSuccess: () => qc.invalidateQueries({ queryKey: projectsQuery().queryKey }),
  });
}
