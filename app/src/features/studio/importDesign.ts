// POST /api/projects/:projectId/designs/:designId/imports (multipart, one field `file`) → { sites, errors: [{ line, message }] }
// Parses and validates the whole file and writes nothing: the workspace previews it and puts the
// sites in only when the modeller accepts (an undoable edit).
import { useMutation } from '@tanstack/react-query';
import { designImportResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';

export function importDesignFile(projectId: number, designId: number, file: File) {
  const body = new FormData();
  body.append('file', file);
  return api(`/api/projects/${projectId}/designs/${designId}/imports`, { method: 'POST', body }, designImportResponseSchema);
}

export function useImportDesignFile(projectId: number, designId: number) {
  return useMutation({ mutationFn: (file: File) => importDesignFile(projectId, designId, file) });
}
