/**
 * The core's progress (geometry/progress.ts: phase, level, site, fraction) in words on standard
 * error, for runs longer than a few seconds only: nothing before `afterMs`, then at most one line
 * every `everyMs` and whenever the phase, level or site changes. The commands turn it off with
 * --json unless --progress asks for it.
 */
import type { CoreProgress } from '../../geometry/pipeline/index';

const PHASE_WORDS: Record<CoreProgress['phase'], string> = {
  mesh: 'building the mesh',
  load: 'integrating the density',
  solve: 'solving',
  quality: 'measuring the mesh',
  encode: 'writing',
  done: 'done',
};

/** One line for one progress report, e.g. "42 % solving for site A on mesh 2". */
export function describeProgress(p: CoreProgress): string {
  const parts = [`${Math.floor(100 * p.fraction)} %`, PHASE_WORDS[p.phase]];
  if (p.site !== undefined) parts.push(`for site ${p.site}`);
  if (p.level !== undefined) parts.push(`on step ${p.level}`);
  return parts.join(' ');
}

export interface ProgressLines {
  onProgress: (p: CoreProgress) => void;
  /** how many lines were written */
  readonly lines: number;
}

export function progressLines(options: { enabled: boolean; afterMs?: number; everyMs?: number; now?: () => number; write?: (line: string) => void }): ProgressLines {
  const afterMs = options.afterMs ?? 3000;
  const everyMs = options.everyMs ?? 1000;
  const now = options.now ?? (() => performance.now());
  const write = options.write ?? ((line: string) => process.stderr.write(`${line}\n`));
  const start = now();
  let last = -Infinity;
  let lastKey = '';
  let lines = 0;
  return {
    get lines() {
      return lines;
    },
    onProgress(p) {
      if (!options.enabled || p.phase === 'done') return;
      const t = now();
      if (t - start < afterMs) return;
      const key = `${p.phase}|${p.level ?? ''}|${p.site ?? ''}`;
      if (key === lastKey && t - last < everyMs) return;
      last = t;
      lastKey = key;
      lines++;
      write(describeProgress(p));
    },
  };
}
