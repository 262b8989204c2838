// POST /api/projects/:projectId/jobs/:jobId/cancel → { job } now cancelled; 409 when it had already finished
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { jobResponseSchema } from '@contracts/api';
import { api } from '../../lib/api';
import { jobsQuery } from './listJobs';

export function cancelJob(projectId: number, jobId: number) {
  return api(`/api/projects/${projectId}/jobs/${jobId}/cancel`, { method: 'POST' }, jobResponseSchema).then((r) => r.job);
}

export function useCancelJob(projectId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (jobId: number) => cancelJob(projectId, jobId),
    onSettled: () => qc.invalidateQueries({ queryKey: jobsQuery(projectId).queryKey }),
  });
}
