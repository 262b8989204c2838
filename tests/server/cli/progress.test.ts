/**
 * The CLI's words for the core's structured progress (server/cli/progress.ts): nothing for a run
 * shorter than a few seconds, then at most a line a second (and one per change of phase, step or
 * site), and none with --json unless --progress asks. Time is a fake clock; the thresholds are
 * common practice (a few seconds before a status line is worth showing).
 */
import { afterAll, afterEach, describe, expect, it, vi } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { describeProgress, progressLines } from '../../../server/cli/progress';
import { run as mesh } from '../../../server/cli/mesh';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const PAIR = path.join(ROOT, 'tests/fixtures/designs/pair-coarse.json');
const dir = mkdtempSync(path.join(tmpdir(), 'tw-progress-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
afterEach(() => vi.restoreAllMocks());

describe('progress lines', () => {
  it('says phase, site, step and percent in words', () => {
    expect(describeProgress({ phase: 'solve', level: 2, site: 'A', fraction: 0.426 })).toBe('42 % solving for site A on step 2');
    expect(describeProgress({ phase: 'mesh', fraction: 0 })).toBe('0 % building the mesh');
  });

  it('is silent for the first 3 s, then throttled to one line a second unless the phase, step or site changes', () => {
    let t = 0;
    const lines: string[] = [];
    const p = progressLines({ enabled: true, now: () => t, write: (l) => lines.push(l) });
    p.onProgress({ phase: 'mesh', fraction: 0 });
    t = 2900;
    p.onProgress({ phase: 'solve', level: 1, site: 'A', fraction: 0.1 });
    expect(lines).toEqual([]);
    t = 3100;
    p.onProgress({ phase: 'solve', level: 1, site: 'A', fraction: 0.2 });
    t = 3500;
    p.onProgress({ phase: 'solve', level: 1, site: 'A', fraction: 0.3 }); // same key, too soon
    p.onProgress({ phase: 'solve', level: 1, site: 'B', fraction: 0.35 }); // new site: shown
    t = 4600;
    p.onProgress({ phase: 'solve', level: 1, site: 'B', fraction: 0.5 }); // a second later: shown
    p.onProgress({ phase: 'done', fraction: 1 }); // never worded
    expect(lines).toEqual(['20 % solving for site A on step 1', '35 % solving for site B on step 1', '50 % solving for site B on step 1']);
    expect(p.lines).toBe(3);
  });

  it('disabled: no line at all', () => {
    const lines: string[] = [];
    const p = progressLines({ enabled: false, now: () => 1e9, write: (l) => lines.push(l) });
    p.onProgress({ phase: 'solve', fraction: 0.5 });
    expect(lines).toEqual([]);
  });
});

describe('mesh command: progress on standard error', () => {
  /** runs the command with a clock that jumps 2 s per reading, so every run looks long */
  async function slowRun(argv: string[]): Promise<{ code: number; stdout: string; progress: string[] }> {
    let t = 0;
    vi.spyOn(performance, 'now').mockImplementation(() => (t += 2000));
    const progress: string[] = [];
    vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => {
      progress.push(String(chunk));
      return true;
    });
    const out: string[] = [];
    vi.spyOn(console, 'log').mockImplementation((...a: unknown[]) => void out.push(a.join(' ')));
    vi.spyOn(console, 'error').mockImplementation(() => {});
    const code = await mesh(argv);
    vi.restoreAllMocks();
    return { code, stdout: out.join('\n'), progress };
  }

  it('words a long run; none with --json; --json --progress asks for it', async () => {
    const readable = await slowRun([PAIR, '--out', path.join(dir, 'a.vtu')]);
    expect(readable.code).toBe(0);
    expect(readable.progress.join('')).toMatch(/^\d+ % measuring the mesh$/m);

    const json = await slowRun([PAIR, '--out', path.join(dir, 'b.vtu'), '--json']);
    expect(json.code).toBe(0);
    expect(json.progress).toEqual([]);
    expect(() => JSON.parse(json.stdout)).not.toThrow();

    const asked = await slowRun([PAIR, '--out', path.join(dir, 'c.vtu'), '--json', '--progress']);
    expect(asked.code).toBe(0);
    expect(asked.progress.length).toBeGreaterThan(0);
    // standard output stays one JSON object
    expect(() => JSON.parse(asked.stdout)).not.toThrow();
  });
});
