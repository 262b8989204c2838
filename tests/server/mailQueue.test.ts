/**
 * Mail through the queue (issue 10, "Scripted use": "the e-mails that routes send today go through the queue too,
 * so a failed send is retried"), against the real PostgreSQL, pg-boss and the fake SMTP server.
 *
 * - With the SMTP server down, sign-up, password reset and invitations still answer as usual; their mails wait
 *   in the queue and arrive once the SMTP server comes up (retried with backoff), and the links in them work.
 * - A queued mail is sealed (AES-256-GCM, NIST SP 800-38D): the link tokens, which the database otherwise keeps
 *   only as sha256 hashes, and the address are not readable in pg-boss's tables.
 * - A standalone job worker (`npm run worker`, no SMTP settings of its own) and its orphan sweep send job e-mails
 *   through the queue; the app process delivers them.
 */
import { readFile } from 'node:fs/promises';
import path from 'node:path';
import bcrypt from 'bcryptjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobResponseSchema, type Job } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { freePort } from '../../server/ops/sys.mjs';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fakeSmtp';
import { mailKey, mailQueueName, openMail, sealMail } from '../../server/mail/queue';
import { startJobWorker, type JobWorker } from '../../server/jobs/worker';
import { silentLogger } from '../../server/config';
import { jobsRepo } from '../../server/repositories/jobs';
import { countMail, linkToken, newUser, startTestEnv, TEST_PASSWORD, testDatabaseUrl, uniqueEmail, VERIFY_SUBJECT, waitForMail, type TestEnv } from './helpers';

const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR = JSON.parse(await readFile(path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json'), 'utf8')) as DesignDocument;

describe('sealing', () => {
  it('a sealed mail opens with the same secret only, and hides its text', () => {
    const mail = { to: 'someone@lab.test', subject: 'Reset your Tetrawell password', text: 'http://x.invalid/reset/abcdef0123456789' };
    const key = mailKey('secret one');
    const sealed = sealMail(mail, key);
    const stored = JSON.stringify(sealed);
    expect(stored).not.toContain('someone@lab.test');
    expect(stored).not.toContain('abcdef0123456789');
    expect(openMail(sealed, key)).toEqual(mail);
    // GCM's tag refuses a different key (NIST SP 800-38D, authenticated decryption)
    expect(() => openMail(sealed, mailKey('secret two'))).toThrow();
    expect(() => openMail(sealed, null)).toThrow(/SESSION_SECRET/);
    expect(openMail(sealMail(mail, null), null)).toEqual(mail);
  });
});

describe('with the SMTP server down at first', () => {
  const prefix = `mailq-${Date.now().toString(36)}-`;
  let env: TestEnv;
  let smtpPort: number;
  let smtp: FakeSmtp | null = null;

  beforeAll(async () => {
    smtpPort = await freePort();
    // nothing listens on smtpPort yet: every send is refused until the fake SMTP server starts there
    env = await startTestEnv({ smtp: { host: '127.0.0.1', port: smtpPort }, jobs: { settings: { queuePrefix: prefix } } });
  }, 60_000);
  afterAll(async () => {
    await env?.stop();
    await smtp?.stop();
  });

  it('requests answer as usual, and their mails arrive once the SMTP server is up', async () => {
    // a confirmed account made directly (sign-up needs the mail this test holds back)
    const ownerEmail = uniqueEmail('mq-owner');
    await env.knex('users').insert({ email: ownerEmail, password_hash: await bcrypt.hash(TEST_PASSWORD, 4), display_name: 'Queue owner', email_verified_at: new Date() });
    const owner = env.client();
    await owner.signIn(ownerEmail);
    const projectId = (await owner.post('/api/projects', { name: 'Queued mail project' })).body.id as number;

    const newcomer = uniqueEmail('mq-new');
    const signUp = await env.client().post('/api/auth/sign-up', { email: newcomer, password: TEST_PASSWORD, displayName: 'Newcomer' });
    expect(signUp.status).toBe(202);
    const reset = await env.client().post('/api/auth/password-reset/request', { email: ownerEmail });
    expect(reset.status).toBeLessThan(300);
    const invitee = uniqueEmail('mq-inv');
    const invite = await owner.post(`/api/projects/${projectId}/invitations`, { email: invitee, role: 'viewer' });
    expect(invite.status).toBe(201);
    // "delivered" to the queue, which retries until the SMTP server takes it
    expect(invite.body.mailDelivered).toBe(true);

    // the sends fail and wait in the queue: nothing arrives
    await new Promise((r) => setTimeout(r, 1_500));
    for (const to of [newcomer, ownerEmail, invitee]) expect(await countMail(env.knex, to)).toBe(0);
    const waiting = (await env.knex('pgboss.job').where({ name: mailQueueName(prefix) }).whereIn('state', ['created', 'retry', 'active']).count<{ n: string }[]>({ n: '*' }))[0]!;
    expect(Number(waiting.n)).toBe(3);
    // sealed in the queue: no address or link in the clear
    const stored = JSON.stringify((await env.knex('pgboss.job').where({ name: mailQueueName(prefix) }).select('data')).map((r: { data: unknown }) => r.data));
    for (const text of [newcomer, ownerEmail, invitee, '/verify/', '/reset/', '/invite/']) expect(stored).not.toContain(text);

    smtp = await startFakeSmtp({ port: smtpPort, knex: env.knex });
    const verifyMail = await waitForMail(env.knex, newcomer, VERIFY_SUBJECT, 30_000);
    await waitForMail(env.knex, ownerEmail, /Reset your Tetrawell password/, 30_000);
    await waitForMail(env.knex, invitee, /Invitation to "Queued mail project"/, 30_000);
    // the link in the late mail works
    const c = env.client();
    const user = await c.verify(linkToken(verifyMail.text, env.mailBase, 'verify'));
    expect(user.email).toBe(newcomer);
    // each mail once
    for (const to of [newcomer, ownerEmail, invitee]) expect(await countMail(env.knex, to)).toBe(1);
  }, 90_000);
});

describe('job e-mails from a standalone worker', () => {
  const prefix = `mailw-${Date.now().toString(36)}-`;
  const settings = { queuePrefix: prefix, notifyAfterSeconds: 0, expireInSeconds: 30, retryLimit: 0 };
  let env: TestEnv;
  let worker: JobWorker | null = null;

  beforeAll(async () => {
    // the app process runs no job worker; it delivers mail
    env = await startTestEnv({ jobs: { workers: 0, settings } });
    // as `npm run worker` starts it: no mailer of its own, links from PUBLIC_URL
    worker = await startJobWorker({ databaseUrl: testDatabaseUrl(), concurrency: 1, settings, logger: silentLogger, pollIntervalMs: 150, publicUrl: () => env.mailBase });
  }, 60_000);
  afterAll(async () => {
    await worker?.stop();
    await env?.stop();
  });

  it('a job it runs mails its starter through the queue', async () => {
    const { client, email } = await newUser(env, 'mq-job');
    const projectId = (await client.post('/api/projects', { name: 'Worker mail project' })).body.id as number;
    const designId = (await client.post(`/api/projects/${projectId}/designs`, { name: 'Worker pair', document: PAIR })).body.design.id as number;
    const start = await client.post(`/api/projects/${projectId}/designs/${designId}/jobs`, { kind: 'mesh', options: { order: 1 } });
    expect(start.status).toBe(202);
    let job: Job = jobResponseSchema.parse(start.body).job;
    const until = Date.now() + 120_000;
    while (!['succeeded', 'failed', 'cancelled'].includes(job.state) && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 150));
      job = jobResponseSchema.parse((await client.get(`/api/projects/${projectId}/jobs/${job.id}`)).body).job;
    }
    expect(job.state).toBe('succeeded');
    const mail = await waitForMail(env.knex, email, new RegExp(`Tetrawell job ${job.id} finished \\(mesh\\)`), 15_000);
    expect(mail.text).toContain(`${env.mailBase}/projects/${projectId}/designs/${designId}`);
  }, 150_000);

  it('a job failed by the orphan sweep mails its starter too', async () => {
    const { client, user, email } = await newUser(env, 'mq-orphan');
    const projectId = (await client.post('/api/projects', { name: 'Orphan mail project' })).body.id as number;
    const designId = (await client.post(`/api/projects/${projectId}/designs`, { name: 'Orphan pair', document: PAIR })).body.design.id as number;
    const { sha256 } = (await env.knex('design_versions').where({ design_id: designId, version: 1 }).first('sha256')) as { sha256: string };
    // a job whose worker kept dying: running in our table, its pg-boss job failed with no retries left
    const jobId = await jobsRepo(env.knex).insert({ projectId, designId, designVersion: 1, designSha256: sha256, createdBy: user.id, kind: 'mesh', options: { order: 1 }, state: 'queued', progress: { phase: 'queued', fraction: 0 } });
    const bossId = (await env.knex.raw(`SELECT gen_random_uuid()::text AS id`)).rows[0].id as string;
    await env.knex.raw(`INSERT INTO pgboss.job (id, name, data, state, retry_count) VALUES (?::uuid, ?, ?::jsonb, 'failed', 0)`, [bossId, `${prefix}mesh`, JSON.stringify({ jobId })]);
    await env.knex('jobs').where({ id: jobId }).update({ state: 'running', boss_job_id: bossId, started_at: env.knex.fn.now() });
    const mail = await waitForMail(env.knex, email, new RegExp(`Tetrawell job ${jobId} failed \\(mesh\\)`), 20_000);
    expect(mail.text).toContain('never finished');
  }, 60_000);
});
