// GET /api/projects/:projectId/revisions/:revisionId/files/potential.f64 → the potential (V) at the vertices of the
// revision's mesh.twmesh (coulomb revisions), decoded into a Float64Array.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { ApiError } from '../../lib/api';
import { revisionQuery } from './getRevision';
import { revisionFileHref } from './revisionFile';

export async function fetchPotentialBytes(projectId: number, revisionId: number, signal?: AbortSignal): Promise<Uint8Array> {
  const res = await fetch(revisionFileHref(projectId, revisionId, 'potential.f64'), { credentials: 'same-origin', signal });
  if (!res.ok) throw new ApiError(res.status, 'internal', `The potential file could not be read (the server answered ${res.status}).`);
  return new Uint8Array(await res.arrayBuffer());
}

export const potentialBytesQuery = (projectId: number, revisionId: number) =>
  queryOptions({
    queryKey: [...revisionQuery(projectId, revisionId).queryKey, 'potential.f64'] as const,
    queryFn: ({ signal }) => fetchPotentialBytes(projectId, revisionId, signal),
    staleTime: Infinity, // revisions never change
    gcTime: 60_000,
  });

export function usePotentialBytes(projectId: number, revisionId: number, enabled: boolean) {
  return useQuery({ ...potentialBytesQuery(projectId, revisionId), enabled });
}
