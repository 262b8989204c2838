// DELETE /api/projects/:projectId/designs/:designId (owners and editors; the UI asks first).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export async function deleteDesign(projectId: number, designId: number): Promise<void> {
  await api(`/api/projects/${projectId}/designs/${designId}`, { method: 'DELETE' });
}

export function useDeleteDesign(projectId: number) {
  const qc = useQueryClient();
  // The project's key covers its designs list, its activity and its own updatedAt (touched by every design write).
  return useMutation({
    mutationFn: (designId: number) => deleteDesign(projectId, designId),
    onSettled: () => qc.invalidateQueries({ queryKey: projectQuery(projectId).queryKey }),
  });
}
