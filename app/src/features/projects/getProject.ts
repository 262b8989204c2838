// GET /api/projects/:projectId: one project with the caller's role and capabilities in it.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { projectSchema } from '@contracts/api';
import { api, bareOrWrapped } from '../../lib/api';
import { projectsQuery } from './listProjects';

const projectAnswer = bareOrWrapped('project', projectSchema);

export function fetchProject(projectId: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}`, { signal }, projectAnswer);
}

export const projectQuery = (projectId: number) =>
  queryOptions({
    // Nested under the list key, so invalidating the list refreshes an open project too.
    queryKey: [...projectsQuery().queryKey, projectId] as const,
    queryFn: ({ signal }) => fetchProject(projectId, signal),
  });

export function useProject(projectId: number, enabled = true) {
  return useQuery({ ...projectQuery(projectId), enabled });
}
