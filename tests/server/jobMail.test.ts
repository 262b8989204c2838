/**
 * Job e-mails (issue 10, "Notifications") against the real PostgreSQL, a real worker and the fake SMTP
 * server: the starter of a job that ran at least `notifyAfterSeconds` gets one mail when it ends, unless
 * their switch (PUT /api/account/notifications) is off. The threshold is a setting; the HTTP tests set it
 * to 0 so a small job qualifies; the last test checks the one-minute default on stored times.
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobResponseSchema, type Job } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { countMail, newUser, startTestEnv, waitForMail, type TestClient, type TestEnv } from './helpers';
import { jobNotifier } from '../../server/jobs/notify';
import { DEFAULT_JOB_SETTINGS } from '../../server/jobs/settings';
import { jobsRepo } from '../../server/repositories/jobs';
import type { OutgoingMail } from '../../server/mail/mailer';

const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR = JSON.parse(await readFile(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8')) as DesignDocument;

let env: TestEnv;

beforeAll(async () => {
  env = await startTestEnv({ jobs: { workers: 1, pollIntervalMs: 150, settings: { queuePrefix: 'job-mail-test-', notifyAfterSeconds: 0 } } });
}, 60_000);

afterAll(async () => {
  await env?.stop();
});

async function projectWithDesign(c: TestClient): Promise<{ projectId: number; designId: number }> {
  const projectId = (await c.post('/api/projects', { name: 'Mail project' })).body.id as number;
  const d = await c.post(`/api/projects/${projectId}/designs`, { name: 'Mailed pair', document: PAIR });
  expect(d.status).toBe(201);
  return { projectId, designId: d.body.design.id as number };
}

async function runJob(c: TestClient, projectId: number, designId: number): Promise<Job> {
  const start = await c.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh', options: { order: 1 } });
  expect(start.status).toBe(202);
  let job = jobResponseSchema.parse(start.body).job;
  const until = Date.now() + 120_000;
  while (!['succeeded', 'failed', 'cancelled'].includes(job.state)) {
    if (Date.now() > until) throw new Error(`job ${job.id} still ${job.state}`);
    await new Promise((r) => setTimeout(r, 150));
    job = jobResponseSchema.parse((await c.get(`/api/projects/${projectId}/jobs/${job.id}`)).body).job;
  }
  return job;
}

describe('job e-mails', () => {
  it('mails the starter once when the job ends, with a link to the design', async () => {
    const { client, email } = await newUser(env, 'mail-on');
    expect((await client.get('/api/account/notifications')).body).toEqual({ jobMail: true });
    const { projectId, designId } = await projectWithDesign(client);
    const job = await runJob(client, projectId, designId);
    expect(job.state).toBe('succeeded');
    const mail = await waitForMail(env.knex, email, new RegExp(`Tetrawell job ${job.id} finished \\(mesh\\)`), 15_000);
    expect(mail.text).toContain(`${env.mailBase}/projects/${projectId}/designs/${designId}`);
    expect(mail.text).toContain('Mailed pair');
    // one mail per job: the claim in jobs.notified_at
    await new Promise((r) => setTimeout(r, 500));
    const n = (await env.knex('captured_mail').whereRaw('recipients @> ?::jsonb', [JSON.stringify([email.toLowerCase()])]).where('subject', 'like', `Tetrawell job ${job.id} %`)).length;
    expect(n).toBe(1);
  }, 150_000);

  it('sends nothing when the switch is off', async () => {
    const { client, email } = await newUser(env, 'mail-off');
    const off = await client.put('/api/account/notifications', { jobMail: false });
    expect(off.status).toBe(200);
    expect((await client.get('/api/account/notifications')).body).toEqual({ jobMail: false });
    const before = await countMail(env.knex, email);
    const { projectId, designId } = await projectWithDesign(client);
    const job = await runJob(client, projectId, designId);
    expect(job.state).toBe('succeeded');
    await new Promise((r) => setTimeout(r, 1500));
    expect(await countMail(env.knex, email)).toBe(before);
    expect((await client.put('/api/account/notifications', { jobMail: 'yes' })).status).toBe(422);
  }, 150_000);

  it('keeps to the threshold: the one-minute default mails a 90 s job, not a 30 s one', async () => {
    expect(DEFAULT_JOB_SETTINGS.notifyAfterSeconds).toBe(60); // issue 10: "a job that ran longer than a minute"
    const { client, user } = await newUser(env, 'mail-threshold');
    const { projectId, designId } = await projectWithDesign(client);
    const { sha256 } = (await env.knex('design_versions').where({ design_id: designId, version: 1 }).first('sha256')) as { sha256: string };
    const common = { projectId, designId, designVersion: 1, designSha256: sha256, createdBy: user.id, kind: 'mesh' as const, options: { order: 1 as const } };
    const done = { state: 'succeeded' as const, progress: { phase: 'done', fraction: 1 }, finished: true };
    const shortJob = await jobsRepo(env.knex).insert({ ...common, ...done });
    const longJob = await jobsRepo(env.knex).insert({ ...common, ...done });
    await env.knex('jobs').where({ id: shortJob }).update({ started_at: env.knex.raw("finished_at - interval '30 seconds'") });
    await env.knex('jobs').where({ id: longJob }).update({ started_at: env.knex.raw("finished_at - interval '90 seconds'") });
    const sent: OutgoingMail[] = [];
    const notifier = jobNotifier({
      knex: env.knex,
      mailer: { send: async (m) => (sent.push(m), true), close() {} },
      publicUrl: () => 'http://tetrawell.invalid',
      notifyAfterSeconds: DEFAULT_JOB_SETTINGS.notifyAfterSeconds,
      logger: { info() {}, warn() {}, error() {} },
    });
    await notifier.afterJob(shortJob);
    await notifier.afterJob(longJob);
    await notifier.afterJob(longJob);
    expect(sent.map((m) => m.subject)).toEqual([`Tetrawell job ${longJob} finished (mesh)`]);
    expect(sent[0]!.text).toContain('after 90 s');
  });
});
