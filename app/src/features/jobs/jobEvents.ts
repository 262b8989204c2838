// GET /api/projects/:projectId/jobs/:jobId/events → text/event-stream, event `job` with { job } at once and on every
// change, ending when the job has finished. Each event is written into the jobs list cache; when the stream is cut
// the list's own polling (listJobs.ts, POLL_MS) keeps the progress moving.
import { useEffect } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { jobResponseSchema, type Job } from '@contracts/api';
import { jobsQuery } from './listJobs';
import { revisionsQuery } from './listRevisions';

export function useJobEvents(projectId: number, job: Job | null) {
  const qc = useQueryClient();
  const jobId = job?.id ?? null;
  const active = job !== null && (job.state === 'queued' || job.state === 'running');
  const designId = job?.designId ?? 0;
  useEffect(() => {
    if (jobId === null || !active || typeof EventSource === 'undefined') return;
    const es = new EventSource(`/api/projects/${projectId}/jobs/${jobId}/events`);
    es.addEventListener('job', (ev) => {
      let parsed;
      try {
        parsed = jobResponseSchema.safeParse(JSON.parse((ev as MessageEvent<string>).data));
      } catch {
        return;
      }
      if (!parsed.success) return;
      const next = parsed.data.job;
      qc.setQueryData(jobsQuery(projectId).queryKey, (old) => old?.map((j) => (j.id === next.id ? next : j)));
      if (next.state !== 'queued' && next.state !== 'running') {
        es.close();
        void qc.invalidateQueries({ queryKey: revisionsQuery(projectId, designId).queryKey });
      }
    });
    // a cut stream: the browser would reconnect by itself, but polling already covers it
    es.onerror = () => es.close();
    return () => es.close();
  }, [qc, projectId, jobId, active, designId]);
}
