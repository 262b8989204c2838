// Types for the parts of postgres.mjs that TypeScript code (tests) uses.

export interface Cluster {
  port: number;
  dataDir: string;
  /** connection URL of `database` as the cluster's superuser */
  url(database: string): string;
  /** pg_ctl stop -m fast (waits); only once per handle */
  stop(): Promise<void>;
}
export function startCluster(opts: { name: string; port: number; disposable?: boolean }): Promise<Cluster>;
export function clusterPaths(name: string): { dataDir: string; runDir: string; logFile: string; passwordFile: string };
