// POST /api/projects/:projectId/designs { name, document? } or { name, copyOf } → 201 { design }
import { useMutation } from '@tanstack/react-query';
import { designResponseSchema } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { api } from '../../lib/api';

export type DesignCreateBody = { name: string; document?: DesignDocument } | { name: string; copyOf: number };

export function createDesign(projectId: number, body: DesignCreateBody) {
  return api(`/api/projects/${projectId}/designs`, { method: 'POST', body }, designResponseSchema).then((r) => r.design);
}

export function useCreateDesign(projectId: number) {
  return useMutation({ mutationFn: (body: DesignCreateBody) => createDesign(projectId, body) });
}
