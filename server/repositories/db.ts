/**
 * Shared bits of the repository layer. Repositories are the only code that sees Knex or SQL;
 * they take a Knex handle (or a transaction, which is a Knex too) and return plain objects
 * with camelCase fields and ISO-8601 strings for times.
 */
import type { Knex } from 'knex';

export type Db = Knex;

export function iso(value: Date | string | null | undefined): string {
  if (value == null) return '';
  return (value instanceof Date ? value : new Date(value)).toISOString();
}

export function isoOrNull(value: Date | string | null | undefined): string | null {
  return value == null ? null : iso(value);
}

/** PostgreSQL's unique_violation (SQLSTATE 23505). */
export function isUniqueViolation(err: unknown): boolean {
  return typeof err === 'object' && err !== null && (err as { code?: string }).code === '23505';
}

/** Is the database reachable? Never throws. */
export async function ping(db: Db): Promise<boolean> {
  try {
    await db.raw('select 1');
    return true;
  } catch {
    return false;
  }
}
