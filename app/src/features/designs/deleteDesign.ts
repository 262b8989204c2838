// DELETE /api/projects/:projectId/designs/:designId (owners and editors; the UI asks first).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { designsQuery } from './listDesigns';

export async function deleteDesign(projectId: number, designId: number): Promise<void> {
  await api(`/api/projects/${projectId}/designs/${designId}`, { method: 'DELETE' });
}

export function useDeleteDesign(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (designId: number) => deleteDesign(projectId, designId),
    onSettled: () => qc.invalidateQueries({ queryKey: designsQuery(projectId).queryKey }),
  });
}
