// GET /api/projects: the projects the signed-in user belongs to, each with their role and capabilities.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { projectListSchema } from '@contracts/api';
import { api } from '../../lib/api';

export async function fetchProjects(signal?: AbortSignal) {
  return (await api('/api/projects', { signal }, projectListSchema)).projects;
}

export const projectsQuery = () =>
  queryOptions({
    queryKey: ['projects'] as const,
    queryFn: ({ signal }) => fetchProjects(signal),
  });

export function useProjects() {
  return useQuery(projectsQuery());
}
