/**
 * Starts tests/bench/load-server.ts (the real `start()`) in a child process for the load benches and resolves
 * with its URL once it prints `LISTENING <url>`. A process of its own, so the bench's client work (autocannon,
 * building big bodies) does not share the event loop it measures.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import path from 'node:path';

const here = path.dirname(fileURLToPath(import.meta.url));
const root = path.resolve(here, '..', '..');

export function benchServerProcess(databaseUrl: string, opts: { nodeArgs?: string[]; env?: Record<string, string> } = {}): Promise<{ child: ChildProcess; url: string }> {
  const child = spawn(process.execPath, [...(opts.nodeArgs ?? []), '--import', 'tsx', path.join(here, 'load-server.ts')], {
    cwd: root,
    env: { ...process.env, ...opts.env, TETRAWELL_BENCH_DATABASE_URL: databaseUrl, NODE_ENV: 'production' },
    stdio: ['pipe', 'pipe', 'inherit'],
  });
  return new Promise((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (d: Buffer) => {
      out += d.toString();
      const m = /LISTENING (\S+)/.exec(out);
      if (m) resolve({ child, url: m[1] });
    });
    child.once('exit', (code) => reject(new Error(`the bench server exited with ${code}`)));
  });
}
