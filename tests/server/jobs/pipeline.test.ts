/**
 * The job side of the pipeline (server/jobs/pipeline.ts) and the command line are two callers of
 * geometry/pipeline: a mesh job's mesh.vtu is byte for byte the CLI's file, a coulomb job's
 * results.json holds what `coulomb --json` prints (timings aside), refusals come back in words and
 * a cancel as an AbortError. No database: runPipeline is called directly.
 */
import { afterAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { JobRefusal, runPipeline } from '../../../server/jobs/pipeline';
import { run as mesh } from '../../../server/cli/mesh';
import { run as coulomb } from '../../../server/cli/coulomb';
import type { Design } from '../../../geometry/design/types';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const PAIR_FILE = path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json');
const PAIR = JSON.parse(readFileSync(PAIR_FILE, 'utf8')) as Design;
const dir = mkdtempSync(path.join(tmpdir(), 'tw-pipeline-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function quiet(run: (argv: string[]) => Promise<number>, argv: string[]): Promise<{ code: number; out: string }> {
  const out: string[] = [];
  const log = vi.spyOn(console, 'log').mockImplementation((...a: unknown[]) => void out.push(a.join(' ')));
  const error = vi.spyOn(console, 'error').mockImplementation(() => {});
  try {
    return { code: await run(argv), out: out.join('\n') };
  } finally {
    log.mockRestore();
    error.mockRestore();
  }
}

const file = (o: ReturnType<typeof runPipeline>, name: string) => o.files.find((f) => f.name === name)!.bytes;

describe('jobs and the CLI share one pipeline', () => {
  it('mesh: the job files equal the CLI files for vtu, vtk and binary, and the summary is the --json keys', async () => {
    const job = runPipeline('mesh', PAIR, { order: 2 });
    for (const [name, out] of [['mesh.vtu', 'x.vtu'], ['mesh.vtk', 'x.vtk'], ['mesh.twmesh', 'x.twmesh']] as const) {
      const target = path.join(dir, out);
      expect((await quiet(mesh, [PAIR_FILE, '--out', target, '--order', '2'])).code).toBe(0);
      expect(Buffer.from(file(job, name)).equals(readFileSync(target)), name).toBe(true);
    }
    const cli = JSON.parse((await quiet(mesh, [PAIR_FILE, '--out', path.join(dir, 'y.vtu'), '--order', '2', '--json'])).out);
    const { seconds: _s, file: _f, ...cliSummary } = cli;
    expect(job.summary).toEqual(cliSummary);
  });

  it('coulomb: results.json is what coulomb --json prints, timings aside', async () => {
    const job = runPipeline('coulomb', PAIR, { order: 1 });
    const fromJob = JSON.parse(new TextDecoder().decode(file(job, 'results.json')));
    const r = await quiet(coulomb, [PAIR_FILE, '--order', '1', '--json']);
    const fromCli = JSON.parse(r.out);
    expect(Object.keys(fromJob)).toEqual(Object.keys(fromCli));
    expect({ ...fromJob, seconds: 0 }).toEqual({ ...fromCli, seconds: 0 });
    const csv = new TextDecoder().decode(file(job, 'results.csv')).trim().split('\n');
    expect(csv[0]).toBe('quantity,site,other_site,distance_nm,value_ev,error_ev');
    expect(csv.length).toBe(1 + fromCli.sites.length + fromCli.pairs.length);
  });

  it('a refusal of the core fails the job in words; a cancel is an AbortError', () => {
    const noElectrons = { ...PAIR, sites: PAIR.sites.map((s) => ({ ...s, electrons: 0 })) };
    expect(() => runPipeline('coulomb', noElectrons, {})).toThrow(JobRefusal);
    expect(() => runPipeline('coulomb', noElectrons, {})).toThrow(/^cannot compute U and V: .*electrons/);
    const ac = new AbortController();
    ac.abort();
    expect(() => runPipeline('coulomb', PAIR, {}, { signal: ac.signal })).toThrow(expect.objectContaining({ name: 'AbortError' }));
  });

  it('stores progress with its level and site, below 1 until the files are stored', () => {
    const seen: { phase: string; fraction: number; level?: number; site?: string }[] = [];
    runPipeline('coulomb', PAIR, { order: 1 }, { onProgress: (p) => seen.push(p) });
    expect(seen.some((p) => p.phase === 'solve' && typeof p.site === 'string' && typeof p.level === 'number')).toBe(true);
    expect(Math.max(...seen.map((p) => p.fraction))).toBeLessThanOrEqual(0.95);
  });
});
