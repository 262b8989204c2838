// Types for the parts of cli-bundle.mjs that TypeScript code (tests) uses.

export const CLI_SOURCE_ROOTS: string[];
export function cliFingerprint(root: string): string;
export function cliBundleDir(root: string, fingerprint: string): string;
export function buildCliBundle(root: string, fingerprint?: string): Promise<string>;
export function ensureCliBundle(root: string, options?: { force?: boolean }): Promise<{ entry: string; built: boolean }>;
