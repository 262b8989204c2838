/**
 * piscina worker: bcrypt hashes and comparisons (see passwordHash.ts). One default export that dispatches: piscina
 * loads a TypeScript worker through tsx's require hook, which finds the default export; a named-only module falls
 * through to import(), for which tsx's loader is not registered in worker threads here (ERR_UNKNOWN_FILE_EXTENSION).
 */
import bcrypt from 'bcryptjs';

export type PasswordTask = { op: 'hash'; password: string; rounds: number } | { op: 'compare'; password: string; hash: string };

export default function run(task: PasswordTask): Promise<string | boolean> {
  return task.op === 'hash' ? bcrypt.hash(task.password, task.rounds) : bcrypt.compare(task.password, task.hash);
}
