// POST /api/projects/:projectId/designs { name, document? } starts a design; { name, copyOf } duplicates one.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import type { designCreateBodySchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export type DesignCreateBody = z.input<typeof designCreateBodySchema>;

/** The contract fixes `{ design }` with at least the new id and name (detail or summary alike). */
const createdAnswer = z.object({ design: z.object({ id: z.number().int(), name: z.string() }) });

export async function createDesign(projectId: number, body: DesignCreateBody) {
  return (await api(`/api/projects/${projectId}/designs`, { method: 'POST', body }, createdAnswer)).design;
}

export function useCreateDesign(projectId: number) {
  const qc = useQueryClient();
  // The project's key covers its designs list, its activity and its own updatedAt (touched by every design write).
  return useMutation({
    mutationFn: (body: DesignCreateBody) => createDesign(projectId, body),
    onSuccess: () => qc.invalidateQueries({ queryKey: projectQuery(projectId).queryKey }),
  });
}
