// Types for the parts of sys.mjs that TypeScript code (tests/ops) uses.

export const ROOT: string;
export const DATA: string;
export class OpsError extends Error {
  /** Set when a lock is refused: what the live holder wrote in the lock file. */
  holder?: Record<string, unknown>;
}
export function pidAlive(pid: number): boolean;
export interface Lock {
  stale: Record<string, unknown> | null;
  update(extra: Record<string, unknown>): void;
  release(): void;
}
export function acquireLock(file: string, what: string): Lock;
export function portInUse(port: number, host?: string): Promise<boolean>;
export function freePort(host?: string): Promise<number>;
