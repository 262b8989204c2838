// GET /api/projects/:projectId/jobs → { jobs } newest first (the last 100). The workspace shows a design's own jobs,
// so a page reload finds a running job again and follows it.
import { queryOptions, useQuery } from '@tanstack/react-query';
import { jobListSchema, type Job } from '@contracts/api';
import { api } from '../../lib/api';
import { projectQuery } from '../projects/getProject';

export function fetchJobs(projectId: number, signal?: AbortSignal) {
  return api(`/api/projects/${projectId}/jobs`, { signal }, jobListSchema).then((r) => r.jobs);
}

export const isActive = (j: Job) => j.state === 'queued' || j.state === 'running';

/** how often the list is read again while a job is active (ms): the fallback when the event stream is cut */
export const POLL_MS = 2_000;

export const jobsQuery = (projectId: number) =>
  queryOptions({
    queryKey: [...projectQuery(projectId).queryKey, 'jobs'] as const,
    queryFn: ({ signal }) => fetchJobs(projectId, signal),
    refetchInterval: (q) => (q.state.data?.some(isActive) ? POLL_MS : false),
  });

export function useJobs(projectId: number) {
  return useQuery(jobsQuery(projectId));
}
