/** What the in-process CLI tests share: design files in a temporary folder, and the console captured per test. */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, vi } from 'vitest';

/** A writer of design files into a fresh temporary folder named after `prefix`. */
export function designFiles(prefix: string): (name: string, doc: unknown) => string {
  const dir = mkdtempSync(join(tmpdir(), `tetrawell-${prefix}-`));
  return (name, doc) => {
    const p = join(dir, name);
    writeFileSync(p, JSON.stringify(doc));
    return p;
  };
}

/** Collects console.log (out) and console.error (err) lines until the test ends. */
export function capture(): { out: string[]; err: string[] } {
  const out: string[] = [];
  const err: string[] = [];
  vi.spyOn(console, 'log').mockImplementation((...a: unknown[]) => void out.push(a.join(' ')));
  vi.spyOn(console, 'error').mockImplementation((...a: unknown[]) => void err.push(a.join(' ')));
  return { out, err };
}

/** Call once per file: the console is restored after every test. */
export function restoreConsoleAfterEach(): void {
  afterEach(() => vi.restoreAllMocks());
}
