// PATCH /api/projects/:projectId: rename or re-describe, guarded by the version the user last saw.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { projectUpdateBodySchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectsQuery } from './listProjects';

export type ProjectUpdateBody = z.input<typeof projectUpdateBodySchema>;

export async function updateProject(projectId: number, body: ProjectUpdateBody): Promise<void> {
  await api(`/api/projects/${projectId}`, { method: 'PATCH', body });
}

export function useUpdateProject(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: ProjectUpdateBody) => updateProject(projectId, body),
    // On success and on a 409 alike the cached copy is out of date.
    onSettled: () => qc.invalidateQueries({ queryKey: projectsQuery().queryKey }),
  });
}
