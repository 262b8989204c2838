// GET /api/invitations/:token: what an e-mailed invitation offers, readable before signing in.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { invitationPreviewSchema } from '@contracts/api';
import { api, bareOrWrapped } from '../../lib/api';

const previewAnswer = bareOrWrapped('invitation', invitationPreviewSchema);

export function fetchInvitationPreview(token: string, signal?: AbortSignal) {
  return api(`/api/invitations/${encodeURIComponent(token)}`, { signal }, previewAnswer);
}

export const invitationPreviewQuery = (token: string) =>
  queryOptions({
    queryKey: ['invitation-preview', token] as const,
    queryFn: ({ signal }) => fetchInvitationPreview(token, signal),
    retry: false,
  });

export function useInvitationPreview(token: string) {
  return useQuery(invitationPreviewQuery(token));
}
