// DELETE /api/projects/:projectId (owners only).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { api } from '../../lib/api';
import { projectsQuery } from './listProjects';
import { projectQuery } from './getProject';

export async function deleteProject(projectId: number): Promise<void> {
  await api(`/api/projects/${projectId}`, { method: 'DELETE' });
}

export function useDeleteProject(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: () => deleteProject(projectId),
    onSuccess: async () => {
      qc.removeQueries({ queryKey: projectQuery(projectId).queryKey });
      await qc.invalidateQueries({ queryKey: projectsQuery().queryKey });
    },
  });
}
