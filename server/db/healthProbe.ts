/**
 * The database check behind GET /api/health: one PostgreSQL connection of its own, kept open, that nothing else
 * may take (issue 8, item 7).
 *
 * Through the server's Knex pool, health's `select 1` shares ten connections with every request's queries: a burst
 * that holds them all (or a pool that must first open a connection, with its SCRAM handshake) makes health wait
 * behind that work, up to the pool's 10 s acquire timeout, and Knex's query machinery costs the request thread more
 * than the round trip itself. Here the check is one simple-protocol `select 1` on a connection of its own, so it
 * answers as soon as PostgreSQL does.
 *
 * Meaning kept: `up()` is true only when PostgreSQL has just answered. Calls that arrive while a check is on its way
 * share that check (its answer is younger than the call's own would be); a check that gets no answer within
 * `timeoutMs` is false and its connection is dropped; a connection that fails or ends (a database restart sends
 * 57P01 admin_shutdown) is dropped too, and the next call connects afresh, so health recovers by itself.
 */
import pg from 'pg';

/** the connection's application_name (pg_stat_activity shows which backend is the health check's) */
export const HEALTH_APPLICATION_NAME = 'tetrawell-health';

export interface HealthProbe {
  /** true when the database answered `select 1` now; never throws */
  up(): Promise<boolean>;
  close(): Promise<void>;
}

export interface HealthProbeOptions {
  /** longest wait for a connection and for the answer, ms; then the database counts as down (default 5,000) */
  timeoutMs?: number;
  /** where a dropped connection is mentioned (warn) */
  logger?: { warn(...a: unknown[]): void };
}

export function createHealthProbe(databaseUrl: string, options: HealthProbeOptions = {}): HealthProbe {
  const timeoutMs = options.timeoutMs ?? 5_000;
  let client: pg.Client | null = null;
  let connecting: Promise<pg.Client> | null = null;
  let inFlight: Promise<boolean> | null = null;
  let closed = false;

  const drop = (c: pg.Client) => {
    if (client === c) client = null;
    c.removeAllListeners('error');
    // an ended client still emits 'error' for a late socket failure: keep a listener so it cannot end the process
    c.on('error', () => {});
    void c.end().catch(() => {});
  };

  const connection = (): Promise<pg.Client> => {
    if (client) return Promise.resolve(client);
    return (connecting ??= (async () => {
      const c = new pg.Client({ connectionString: databaseUrl, connectionTimeoutMillis: timeoutMs, application_name: HEALTH_APPLICATION_NAME });
      // an EventEmitter without an 'error' listener throws: the restart case (server/index.ts, issue 8 item 1)
      c.on('error', (e) => {
        options.logger?.warn('health check: its database connection ended:', e.message);
        drop(c);
      });
      c.on('end', () => {
        if (client === c) client = null;
      });
      try {
        await c.connect();
      } catch (e) {
        drop(c);
        throw e;
      }
      if (closed) {
        drop(c);
        throw new Error('the health check is closed');
      }
      client = c;
      return c;
    })().finally(() => {
      connecting = null;
    }));
  };

  const check = async (): Promise<boolean> => {
    let timer: NodeJS.Timeout | undefined;
    let used: pg.Client | null = null;
    const late = new Promise<false>((resolve) => {
      timer = setTimeout(() => {
        // no answer in time: whatever the connection was doing, it is not trusted again
        if (used) drop(used);
        resolve(false);
      }, timeoutMs);
    });
    const asked = (async () => {
      try {
        used = await connection();
        await used.query('select 1');
        return true;
      } catch {
        if (used) drop(used);
        return false;
      }
    })();
    try {
      return await Promise.race([asked, late]);
    } finally {
      clearTimeout(timer);
    }
  };

  return {
    up() {
      if (closed) return Promise.resolve(false);
      return (inFlight ??= check().finally(() => {
        inFlight = null;
      }));
    },
    async close() {
      closed = true;
      await inFlight?.catch(() => false);
      const c = client ?? (await connecting?.catch(() => null)) ?? null;
      if (c) {
        client = null;
        c.removeAllListeners('error');
        c.on('error', () => {});
        await c.end().catch(() => {});
      }
    },
  };
}
