// PUT /api/projects/:projectId/design { design, version }: editors and owners; a stale version is 409.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { projectDesignUpdateBodySchema } from '@contracts/api';
import { api } from '../../lib/api';
import { designQuery } from './getDesign';

export type DesignSaveBody = z.input<typeof projectDesignUpdateBodySchema>;

export async function saveDesign(projectId: number, body: DesignSaveBody): Promise<void> {
  await api(`/api/projects/${projectId}/design`, { method: 'PUT', body });
}

export function useSaveDesign(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: DesignSaveBody) => saveDesign(projectId, body),
    onSettled: () => qc.invalidateQueries({ queryKey: designQuery(projectId).queryKey }),
  });
}
