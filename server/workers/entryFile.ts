/**
 * Where the code of a worker thread or helper process is, and how node must start it: the TypeScript file through
 * tsx (`--import tsx`) when the caller itself runs as TypeScript (tsx, vitest) or no JavaScript was emitted beside it,
 * else the emitted `.js` file. `callerUrl` is the caller's `import.meta.url`; `base` the file name without extension,
 * next to the caller.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

export function entryFile(callerUrl: string, base: string): { filename: string; execArgv: string[] } {
  const ts = fileURLToPath(new URL(`./${base}.ts`, callerUrl));
  const js = fileURLToPath(new URL(`./${base}.js`, callerUrl));
  if (callerUrl.endsWith('.ts') || !existsSync(js)) return { filename: ts, execArgv: ['--import', 'tsx'] };
  return { filename: js, execArgv: [] };
}
