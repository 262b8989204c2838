// GET /api/projects/:projectId/revisions/:revisionId/files/mesh.twmesh → the TWMESH bytes, decoded straight into the
// mesh's typed arrays (README "Mesh files"; geometry/mesh/export/binary.ts is the one reader).
import { queryOptions, useQuery } from '@tanstack/react-query';
import { decodeMeshBinary } from '../../../../geometry/mesh/export/binary';
import { ApiError } from '../../lib/api';
import { revisionQuery } from './getRevision';
import { revisionFileHref } from './revisionFile';

export async function fetchMeshBytes(projectId: number, revisionId: number, signal?: AbortSignal) {
  const res = await fetch(revisionFileHref(projectId, revisionId, 'mesh.twmesh'), { credentials: 'same-origin', signal });
  if (!res.ok) throw new ApiError(res.status, 'internal', `The mesh file could not be read (the server answered ${res.status}).`);
  return decodeMeshBinary(new Uint8Array(await res.arrayBuffer()));
}

export const meshBytesQuery = (projectId: number, revisionId: number) =>
  queryOptions({
    queryKey: [...revisionQuery(projectId, revisionId).queryKey, 'mesh.twmesh'] as const,
    queryFn: ({ signal }) => fetchMeshBytes(projectId, revisionId, signal),
    staleTime: Infinity, // revisions never change
    gcTime: 60_000, // large: do not keep it long after the viewer closes
  });

export function useMeshBytes(projectId: number, revisionId: number) {
  return useQuery(meshBytesQuery(projectId, revisionId));
}
