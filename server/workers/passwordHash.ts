/**
 * bcrypt hashes and comparisons off the request thread. bcryptjs is JavaScript: its asynchronous API splits the work
 * into slices of up to 100 ms (bcryptjs README, "Usage - Async", from memory) but runs every slice on the calling
 * thread, so a sign-in at cost 12 took ~270 ms of the request thread and held /api/health and every other request for
 * up to ~100 ms at a time (measured on the 2-core test machine: event-loop delay max 101.9 ms per hash). Here the
 * work runs in a piscina worker thread at the request thread's own priority (a sign-in is interactive).
 *
 * One thread by default, one fewer than the cores when there are more: a burst of sign-ins queues instead of taking
 * every core from the thread that answers requests.
 */
import { availableParallelism } from 'node:os';
import Piscina from 'piscina';
import type { PasswordTask } from './passwordHash.worker';
import { entryFile } from './entryFile';

export interface PasswordHasher {
  hash(password: string): Promise<string>;
  /** false for a wrong password; a malformed stored hash rejects */
  compare(password: string, hash: string): Promise<boolean>;
  close(): Promise<void>;
}


export function passwordHasher(opts: { rounds: number; maxThreads?: number }): PasswordHasher {
  let pool: Piscina | null = null;
  const maxThreads = opts.maxThreads ?? Math.max(1, availableParallelism() - 1);
  // started on first use, and gone 60 s after the last sign-in
  const getPool = () => (pool ??= new Piscina({ ...entryFile(import.meta.url, 'passwordHash.worker'), minThreads: 0, maxThreads, idleTimeout: 60_000 }));
  return {
    async hash(password) {
      return (await getPool().run({ op: 'hash', password, rounds: opts.rounds } satisfies PasswordTask)) as string;
    },
    async compare(password, hash) {
      return (await getPool().run({ op: 'compare', password, hash } satisfies PasswordTask)) as boolean;
    },
    async close() {
      const p = pool;
      pool = null;
      await p?.destroy();
    },
  };
}
