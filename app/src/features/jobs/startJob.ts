// POST /api/projects/:projectId/designs/:designId/jobs { kind, options } → 202 { job } queued, or 200 { job } reused
// (an earlier revision of the same content and options answers at once).
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { jobResponseSchema, type JobCreateBody } from '@contracts/api';
import { api } from '../../lib/api';
import { jobsQuery } from './listJobs';
import { revisionsQuery } from './listRevisions';

export function startJob(projectId: number, designId: number, body: JobCreateBody) {
  return api(`/api/projects/${projectId}/designs/${designId}/jobs`, { method: 'POST', body }, jobResponseSchema).then((r) => r.job);
}

export function useStartJob(projectId: number, designId: number) {
  const qc = useQueryClient();
  return useMutation({
    mutationFn: (body: JobCreateBody) => startJob(projectId, designId, body),
    onSuccess: async () => {
      await Promise.all([
        qc.invalidateQueries({ queryKey: jobsQuery(projectId).queryKey }),
        qc.invalidateQueries({ queryKey: revisionsQuery(projectId, designId).queryKey }),
      ]);
    },
  });
}
