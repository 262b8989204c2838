// Types for the parts of setup.mjs that TypeScript code (tests, benches) uses.

export function prepareDatabase(opts: {
  databaseUrl: string;
  adminUrl?: string;
  create?: boolean;
  recreate?: boolean;
  seed?: boolean;
}): Promise<{ created?: boolean; migrations?: number; seeded?: boolean; logins?: unknown }>;
