/**
 * Fixed SQL statements sent straight to one of Knex's pooled pg connections, for the busiest reads (the jobs and
 * revisions lists the studio polls while jobs run; issue 10, "Faults and load").
 *
 * Why not `db.select(...)` or `db.raw(...)`: for a statement whose text never changes, Knex's query builder, its
 * compiler (lodash), binding rewrite and runner cost the request thread about as much CPU as pg's own work on
 * the answer (`npm run bench -- jobs`, profiled). Here the text is written once, as a named prepared statement
 * (PostgreSQL parses and plans it once per connection), and only the connection comes from Knex's pool, so
 * the pool size, the acquire timeout (KnexTimeoutError, answered 503) and the dropping of broken connections
 * stay Knex's. Knex's `query` event is still emitted, so whoever counts or logs statements keeps seeing them.
 */
import type { Knex } from 'knex';

export interface Statement {
  /** the prepared statement's name: one text per name for the life of a connection (PostgreSQL refuses a second) */
  name: string;
  /** SQL with $1, $2, … placeholders */
  text: string;
}

interface PgConnection {
  query(config: { name: string; text: string; values: unknown[] }): Promise<{ rows: unknown[] }>;
}

/** Runs `st` with `values` on a pooled connection of `db` and returns its rows. */
export async function runStatement<Row>(db: Knex, st: Statement, values: unknown[]): Promise<Row[]> {
  // a transaction has one connection of its own, which this does not use: refuse rather than read outside it
  if (db.isTransaction) throw new Error(`statement ${st.name} runs on the pool, not inside a transaction`);
  const client = db.client as Knex.Client;
  const conn = (await client.acquireConnection()) as PgConnection;
  try {
    client.emit('query', { sql: st.text, bindings: values, method: 'raw', options: { name: st.name } });
    return (await conn.query({ name: st.name, text: st.text, values })).rows as Row[];
  } finally {
    await client.releaseConnection(conn);
  }
}

/**
 * A timestamptz column as the text `Date.prototype.toISOString` gives for it (what the API always sent): UTC,
 * milliseconds truncated as a JavaScript Date truncates PostgreSQL's microseconds (ECMA-262 MakeTime,
 * ToIntegerOrInfinity; PostgreSQL's to_char `MS` divides the microseconds by 1000). Null stays null.
 */
export const isoText = (column: string): string => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;
