// Rename = GET /api/projects/:projectId/designs/:designId, then PUT the same path with
// { document, version, name }: the document goes back unchanged under the version just read, so a
// save by someone else in between is answered 409 stale_write instead of being overwritten.
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { designResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export async function renameDesign(projectId: number, designId: number, name: string) {
  const path = `/api/projects/${projectId}/designs/${designId}`;
  const { design } = await api(path, {}, designResponseSchema);
  // The server keeps the document's name equal to the design's; send both the same.
  const document = { ...design.document, name };
  await api(path, { method: 'PUT', body: { document, version: design.version, name } });
}

export function useRenameDesign(projectId: number) {
  const qc = useQueryClient();
  // The project's key covers its designs list, its activity and its own updatedAt (touched by every design write).
  return useMutation({
    mutationFn: ({ designId, name }: { designId: number; name: string }) => renameDesign(projectId, designId, name),
    // On success and on a 409 alike the listed name and version may be out of date.
    onSettled: () => qc.invalidateQueries({ queryKey: projectQuery(projectId).queryKey }),
  });
}
