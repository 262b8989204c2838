// Types for lib.mjs (plain JavaScript so the ops scripts run before node_modules exists).

export function compareVersions(a: string, b: string): -1 | 0 | 1;
export function pickPgBinDir(input: {
  pathDirs: string[];
  versionedRoot: string;
  versionedDirs: string[];
  hasTools: (dir: string) => boolean;
}): string | null;
export function sha256(data: string | Uint8Array): string;
export function depsDecision(input: {
  hasNodeModules: boolean;
  storedHash: string | null;
  lockHash: string;
  hiddenLockMtimeMs: number | null;
  lockMtimeMs: number | null;
}): { install: boolean; reason: string };
export function sourcesFingerprint(entries: { path: string; size: number; mtimeMs: number }[]): string;
export function pgUrl(input: { user: string; password?: string | null; host?: string; port: number; database: string; socketDir?: string }): string;
export function portFromEnv(value: string | undefined | null, fallback: number): number;
export function shQuote(arg: string): string;
export function pgConfQuote(value: string): string;
export interface Counts {
  passed: number;
  failed: number;
  skipped: number;
}
export function countsFromVitestJson(json: unknown): Counts;
export function countsFromPlaywrightJson(json: unknown): Counts;
export function countsFromEslintJson(json: unknown[]): { files: number; errors: number; warnings: number };
export function countTscErrors(output: string): number;
export interface StageResult {
  name: string;
  ok: boolean;
  detail?: string;
  passed?: number;
  failed?: number;
  skipped?: number;
  notRun?: boolean;
}
export function formatSummary(stages: StageResult[]): { text: string; passed: number; failed: number; skipped: number };
export function demoLogins(result: unknown): { email: string; password: string; role: string | null }[];
