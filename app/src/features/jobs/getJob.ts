// GET /api/projects/:projectId/jobs/:jobId → { job }
import { queryOptions, useQuery } from '@tanstack/react-query';
import { jobResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { jobsQuery } from './listJobs';

export function fetchJob(projectId: number, jobId: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}/jobs/${jobId}`, { signal }, jobResponseSchema).then((r) => r.job);
}

export const jobQuery = (projectId: number, jobId: number) =>
  queryOptions({
    queryKey: [...jobsQuery(projectId).queryKey, jobId] as const,
    queryFn: ({ signal }) => fetchJob(projectId, jobId, signal),
  });

export function useJob(projectId: number, jobId: number) {
  return useQuery(jobQuery(projectId, jobId));
}
