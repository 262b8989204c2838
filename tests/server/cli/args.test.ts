/**
 * The commands' argument parsing (node:util parseArgs behind server/cli/args.ts): the same
 * options and the same plain words for bad input in mesh, coulomb, convergence and check, exit
 * code 2 for usage errors, and never a stack trace. Runs the commands in-process.
 */
import { afterAll, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { parseCli } from '../../../server/cli/args';
import { run as mesh, parseArgs as meshArgs } from '../../../server/cli/mesh';
import { run as coulomb } from '../../../server/cli/coulomb';
import { run as convergence } from '../../../server/cli/convergence';
import { run as check } from '../../../server/cli/check';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const PAIR = path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json');
const dir = mkdtempSync(path.join(tmpdir(), 'tw-args-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function capture(run: (argv: string[]) => Promise<number>, argv: string[]): Promise<{ code: number; out: string; err: string }> {
  const out: string[] = [];
  const err: string[] = [];
  const log = vi.spyOn(console, 'log').mockImplementation((...a: unknown[]) => void out.push(a.join(' ')));
  const error = vi.spyOn(console, 'error').mockImplementation((...a: unknown[]) => void err.push(a.join(' ')));
  try {
    return { code: await run(argv), out: out.join('\n'), err: err.join('\n') };
  } finally {
    log.mockRestore();
    error.mockRestore();
  }
}

describe('parseCli', () => {
  const spec = { out: { type: 'string' as const, needs: 'needs a file name' }, site: { type: 'string' as const, multiple: true }, json: { type: 'boolean' as const } };

  it('reads values, repeated options and positionals', () => {
    const r = parseCli(['a.json', '--out=x.vtu', '--site', 'p', '--site', 'q', '--json'], spec);
    expect(r).toEqual({ values: { out: 'x.vtu', site: ['p', 'q'], json: true }, positionals: ['a.json'] });
  });

  it('puts each kind of mistake in our words', () => {
    expect(parseCli(['--frobnicate'], spec)).toEqual({ error: 'unknown option --frobnicate' });
    expect(parseCli(['-x'], spec)).toEqual({ error: 'unknown option -x' });
    expect(parseCli(['a', '--out'], spec)).toEqual({ error: '--out needs a file name' });
    // a value that looks like an option is not taken as the value
    expect(parseCli(['a', '--out', '--json'], spec)).toEqual({ error: '--out needs a file name' });
    expect(parseCli(['a', '--site'], spec)).toEqual({ error: '--site needs a value' });
    expect(parseCli(['a', '--json=yes'], spec)).toEqual({ error: '--json takes no value' });
  });
});

describe('the same words in every command', () => {
  it('mesh: the old messages, exit 2', async () => {
    expect(meshArgs([PAIR])).toMatch(/^--out <file> is required\nusage: /);
    expect(meshArgs([PAIR, '--out'])).toMatch(/^--out needs a file name\n/);
    expect(meshArgs([PAIR, '--out', 'x.vtu', '--order', '3'])).toMatch(/^--order must be 1 or 2, not 3\n/);
    expect(meshArgs([PAIR, '--out', 'x.vtu', '--order'])).toMatch(/^--order must be 1 or 2, not nothing\n/);
    expect(meshArgs([PAIR, '--out', 'x.vtu', '--format', 'obj'])).toMatch(/^--format must be vtu, vtk or binary, not obj\n/);
    expect(meshArgs([PAIR, PAIR, '--out', 'x.vtu'])).toMatch(/^one design file, please \(got 2\)\n/);
    expect(meshArgs([PAIR, '--out', 'x.twmesh', '--solve'])).toMatch(/^--solve writes potentials as point data/);
    expect(meshArgs([PAIR, '--out=x.vtk', '--order=2', '--json'])).toEqual({ file: PAIR, out: 'x.vtk', order: 2, format: 'vtk', json: true, solve: false, progress: false });
    const r = await capture(mesh, [PAIR, '--out', path.join(dir, 'x.vtu'), '--bogus']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/^unknown option --bogus\nusage: npm run cli -- mesh/);
  });

  it('coulomb: unknown options, bad values and missing values, exit 2 before any work', async () => {
    for (const [argv, words] of [
      [[PAIR, '--frobnicate'], /^unknown option --frobnicate\nusage: npm run cli -- coulomb/],
      [[PAIR, '--order', '3'], /^--order must be 1 or 2, not "3"/],
      [[PAIR, '--theta', '0'], /^--theta must be a number in \(0, 1\], not "0"/],
      [[PAIR, '--pairs', 'some'], /^--pairs must be auto, all, bond-graph or none, not "some"/],
      [[PAIR, '--site'], /^--site needs a value\n/],
      [[PAIR, '--json=1'], /^--json takes no value\n/],
      [[], /^usage: npm run cli -- coulomb/],
    ] as const) {
      const r = await capture(coulomb, [...argv]);
      expect(r.code, argv.join(' ')).toBe(2);
      expect(r.err).toMatch(words);
      expect(r.out).toBe('');
    }
  });

  it('convergence: --kind is required and checked, --levels in 3..8', async () => {
    for (const [argv, words] of [
      [[PAIR], /^usage: npm run cli -- convergence/],
      [[PAIR, '--kind', 'depth'], /^--kind must be refinement or box, not "depth"\nusage:/],
      [[PAIR, '--kind', 'box', '--levels', '9'], /^--levels must be a whole number from 3 to 8, not "9"/],
      [[PAIR, '--kind', 'box', '--nope'], /^unknown option --nope\nusage:/],
    ] as const) {
      const r = await capture(convergence, [...argv]);
      expect(r.code, argv.join(' ')).toBe(2);
      expect(r.err).toMatch(words);
    }
  });

  it('check: unknown options and a missing file, exit 2; --help and -h print the usage', async () => {
    expect((await capture(check, [PAIR, '--frobnicate'])).err).toMatch(/^unknown option --frobnicate\nusage: npm run cli -- check/);
    expect((await capture(check, [])).code).toBe(2);
    for (const run of [check, coulomb, convergence, mesh]) {
      for (const flag of ['--help', '-h']) {
        const r = await capture(run, [flag]);
        expect(r.code).toBe(0);
        expect(r.out).toMatch(/^usage: npm run cli -- /);
      }
    }
  });
});
