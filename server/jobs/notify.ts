/**
 * Job e-mails (issue 10, "Notifications"): when a job that ran at least `notifyAfterSeconds` (default 60)
 * ends as succeeded or failed, the person who started it gets one e-mail, unless they switched job
 * e-mails off (users.notify_job_mail). `jobs.notified_at` is claimed in one UPDATE, so two workers or a
 * retried job never send it twice.
 */
import type { Knex } from 'knex';
import type { Logger } from '../config';
import type { Mailer } from '../mail/mailer';
import { jobEndedMail } from '../mail/templates';

export interface JobNotifier {
  afterJob(jobId: number): Promise<void>;
}

export function jobNotifier(opts: { knex: Knex; mailer: Mailer; publicUrl: () => string; notifyAfterSeconds: number; logger: Logger }): JobNotifier {
  const { knex, mailer, logger } = opts;
  return {
    async afterJob(jobId) {
      const claimed = (await knex('jobs')
        .where({ id: jobId })
        .whereIn('state', ['succeeded', 'failed'])
        .whereNull('notified_at')
        .whereNotNull('started_at')
        .whereNotNull('finished_at')
        .whereNotNull('created_by')
        .whereRaw('extract(epoch from (finished_at - started_at)) >= ?', [opts.notifyAfterSeconds])
        .update({ notified_at: knex.fn.now() })
        .returning(['id', 'project_id', 'design_id', 'design_version', 'kind', 'state', 'error', 'created_by', knex.raw('extract(epoch from (finished_at - started_at))::float8 as seconds')])) as {
        id: number;
        project_id: number;
        design_id: number;
        design_version: number;
        kind: string;
        state: 'succeeded' | 'failed';
        error: string | null;
        created_by: number;
        seconds: number;
      }[];
      const job = claimed[0];
      if (!job) return;
      const user = (await knex('users').where({ id: job.created_by }).first('email', 'display_name', 'notify_job_mail')) as
        | { email: string; display_name: string; notify_job_mail: boolean }
        | undefined;
      if (!user?.notify_job_mail) return;
      const design = (await knex('designs').where({ id: job.design_id }).first('name')) as { name: string } | undefined;
      const base = opts.publicUrl().replace(/\/+$/, '');
      const mail = jobEndedMail({
        displayName: user.display_name,
        jobId: job.id,
        kind: job.kind,
        designName: design?.name ?? `design ${job.design_id}`,
        designVersion: job.design_version,
        state: job.state,
        error: job.error,
        seconds: Number(job.seconds),
        link: `${base}/projects/${job.project_id}/designs/${job.design_id}`,
      });
      if (!(await mailer.send({ to: user.email, ...mail }))) logger.warn(`job ${job.id}: the job e-mail to ${user.email} was not sent`);
    },
  };
}
