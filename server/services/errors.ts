/**
 * The one error type services throw. It names an API error code; the HTTP layer
 * (server/http/errors.ts) turns the code into a status and the `{ error: {...} }` body.
 */
import type { ErrorCode } from '@contracts/api';
import type { z } from 'zod';

export interface FieldIssue {
  path: (string | number)[];
  message: string;
}

/** On a 409 `stale_write` of a design: the version that is now current, who saved it and when. */
export interface CurrentVersion {
  version: number;
  updatedAt: string;
  updatedBy: string | null;
}

export class AppError extends Error {
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly details?: FieldIssue[],
    readonly current?: CurrentVersion,
  ) {
    super(message);
    this.name = 'AppError';
  }
}

export const notFound = (what = 'The requested item') => new AppError('not_found', `${what} was not found.`);
export const forbidden = (message = 'Your role does not allow this.') => new AppError('forbidden', message);
export const unauthenticated = (message = 'Sign in to continue.') => new AppError('unauthenticated', message);
export const conflict = (message: string) => new AppError('conflict', message);
export const staleWrite = (what: string, current?: CurrentVersion) =>
  new AppError(
    'stale_write',
    current
      ? `${what} was saved by ${current.updatedBy ?? 'someone else'} at ${current.updatedAt} (version ${current.version}) since you loaded it. Reload to see the latest version, or keep yours as a copy.`
      : `${what} was changed by someone else since you loaded it. Reload to see the latest version, then apply your change again.`,
    undefined,
    current,
  );

/** zod issues → field issues for the client's inline form errors. */
export function issuesToDetails(issues: readonly z.core.$ZodIssue[]): FieldIssue[] {
  return issues.map((i) => ({
    path: i.path.map((p) => (typeof p === 'number' ? p : String(p))),
    message: i.message,
  }));
}

/** Parse `value` with `schema` or throw a 422 `validation_failed` listing every issue. */
export function parseOr422<S extends z.ZodType>(schema: S, value: unknown, where = 'request'): z.infer<S> {
  const r = schema.safeParse(value);
  if (!r.success) {
    throw new AppError('validation_failed', `Some fields of the ${where} need attention.`, issuesToDetails(r.error.issues));
  }
  return r.data;
}
