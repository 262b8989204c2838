/**
 * The software version written on every revision: the package version, and the git commit when
 * it is known (TETRAWELL_COMMIT, else `git rev-parse HEAD` once at start; null when neither works,
 * e.g. in an unpacked release without .git).
 */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const ROOT = fileURLToPath(new URL('../../', import.meta.url));

let cached: { version: string; commit: string | null } | null = null;

export function softwareVersion(): { version: string; commit: string | null } {
  if (cached) return cached;
  let version = '0.0.0';
  try {
    version = (JSON.parse(readFileSync(`${ROOT}package.json`, 'utf8')) as { version: string }).version;
  } catch {
    /* keep the placeholder */
  }
  let commit: string | null = process.env.TETRAWELL_COMMIT?.trim() || null;
  if (!commit) {
    try {
      const out = execFileSync('git', ['rev-parse', 'HEAD'], { cwd: ROOT, encoding: 'utf8', timeout: 5_000, stdio: ['ignore', 'pipe', 'ignore'] }).trim();
      commit = /^[0-9a-f]{40}$/.test(out) ? out : null;
    } catch {
      commit = null;
    }
  }
  cached = { version, commit };
  return cached;
}
