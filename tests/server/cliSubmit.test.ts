/**
 * `npm run cli -- submit` (remote mode) as a separate process against the real test server (port 0,
 * real PostgreSQL, a real job worker), authenticated by a personal API token.
 *
 * Outside reference: the project's own command line run locally on the same file. The downloaded
 * mesh.vtu must be byte-identical to `npm run cli -- mesh <file> --out x.vtu --order 1` (issue 10's
 * contract for revisions).
 */
import { execFile } from 'node:child_process';
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { apiTokenCreatedSchema } from '@contracts/api';
import { newUser, startTestEnv, type TestClient, type TestEnv } from './helpers';

const ROOT = path.resolve(import.meta.dirname, '../..');
const PAIR_FILE = path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json');

let env: TestEnv;
let owner: TestClient;
let secret: string;
let tmp: string;

interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

/** the CLI as a child process, with a time limit so a hang fails the test instead of the runner */
function cli(args: string[], extraEnv: Record<string, string> = {}): Promise<Run> {
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      ['--import', 'tsx', path.join(ROOT, 'server/cli/index.ts'), ...args],
      { cwd: ROOT, timeout: 150_000, maxBuffer: 64 << 20, env: { ...process.env, TETRAWELL_TOKEN: '', ...extraEnv } },
      (err, stdout, stderr) => resolve({ code: err ? ((err as { code?: number }).code ?? 1) : 0, stdout, stderr }),
    );
  });
}

beforeAll(async () => {
  env = await startTestEnv({ jobs: { workers: 1, pollIntervalMs: 150, settings: { queuePrefix: 'cli-submit-test-' } } });
  tmp = await mkdtemp(path.join(tmpdir(), 'tetrawell-submit-'));
  owner = (await newUser(env, 'submit-owner')).client;
  secret = apiTokenCreatedSchema.parse((await owner.post('/api/account/tokens', { name: 'submit test' })).body).secret;
}, 60_000);

afterAll(async () => {
  await env?.stop();
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('cli submit (remote mode)', () => {
  it('stores the design, runs a mesh job, follows it and downloads a mesh.vtu identical to the local CLI', async () => {
    const out = path.join(tmp, 'remote.vtu');
    const r = await cli(['submit', PAIR_FILE, '--server', env.url, '--token', secret, '--kind', 'mesh', '--order', '1', '--wait', '--out', out, '--poll', '100']);
    expect(r.code, r.stderr).toBe(0);
    const result = JSON.parse(r.stdout.trim().split('\n').at(-1)!) as { projectId: number; designId: number; jobId: number; state: string; revisionId: number; file: string };
    expect(result.state).toBe('succeeded');
    expect(result.file).toBe(out);
    expect(r.stderr).toMatch(/job \d+: (running|succeeded)/);

    // the job and design belong to the token's owner
    const job = await owner.get(`/api/projects/${result.projectId}/jobs/${result.jobId}`);
    expect(job.status).toBe(200);
    expect(job.body.job.revisionId).toBe(result.revisionId);

    const local = path.join(tmp, 'local.vtu');
    const l = await cli(['mesh', PAIR_FILE, '--out', local, '--order', '1']);
    expect(l.code, l.stderr).toBe(0);
    expect(Buffer.compare(await readFile(out), await readFile(local))).toBe(0);

    // --design stores a new version of the same design; the same content and options reuse the revision
    const again = await cli(['submit', PAIR_FILE, '--server', env.url, '--kind', 'mesh', '--order', '1', '--project', String(result.projectId), '--design', String(result.designId), '--wait'], {
      TETRAWELL_TOKEN: secret,
    });
    expect(again.code, again.stderr).toBe(0);
    const second = JSON.parse(again.stdout.trim().split('\n').at(-1)!) as { designId: number; designVersion: number; state: string; jobId: number; reused: boolean; revisionId: number };
    expect(second.designId).toBe(result.designId);
    expect(second.designVersion).toBe(2);
    expect(second.state).toBe('succeeded');
    expect(second.jobId).not.toBe(result.jobId);
    expect(second.reused).toBe(true);
    expect(second.revisionId).toBe(result.revisionId);
  }, 180_000);

  it('says plainly when the token is refused (exit 1) and when the arguments are wrong (exit 2)', async () => {
    const bad = await cli(['submit', PAIR_FILE, '--server', env.url, '--token', 'twk_wrong', '--kind', 'mesh']);
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/refused .*\(401\): This API token is not valid/);
    const usage = await cli(['submit', PAIR_FILE, '--server', env.url, '--token', secret, '--kind', 'paint']);
    expect(usage.code).toBe(2);
    expect(usage.stderr).toContain('--kind must be one of mesh, coulomb, convergence');
    const sweep = await cli(['submit', PAIR_FILE, '--server', env.url, '--token', secret, '--kind', 'mesh', '--sweep', 'box']);
    expect(sweep.code).toBe(2);
    const down = await cli(['submit', PAIR_FILE, '--server', 'http://127.0.0.1:9', '--token', secret, '--kind', 'mesh']);
    expect(down.code).toBe(1);
    expect(down.stderr).toMatch(/cannot reach http:\/\/127\.0\.0\.1:9/);
  }, 120_000);
});
