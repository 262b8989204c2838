// PUT /api/projects/:projectId/designs/:designId { document, version, name? } → 200 { design }, or 409 stale_write
// with error.current = { version, updatedAt, updatedBy } (kept on ApiError.current).
import { useMutation } from '@tanstack/react-query';
import { designResponseSchema } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { api } from '../../lib/api';

export interface DesignSaveBody {
  document: DesignDocument;
  version: number;
  name?: string;
}

export function saveDesign(projectId: number, designId: number, body: DesignSaveBody) {
  return api(`/api/projects/${projectId}/designs/${designId}`, { method: 'PUT', body }, designResponseSchema).then((r) => r.design);
}

export function useSaveDesign(projectId: number, designId: number) {
  return useMutation({ mutationFn: (body: DesignSaveBody) => saveDesign(projectId, designId, body) });
}
