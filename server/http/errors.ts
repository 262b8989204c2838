/**
 * The single error middleware: every failure leaves as `{ error: { code, message, details? } }`.
 * Stack traces and driver messages stay in the server log; the client sees plain words.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { ErrorBody, ErrorCode } from '@contracts/api';
import { AppError } from '../services/errors';
import type { Logger } from '../config';

export const STATUS_BY_CODE: Record<ErrorCode, number> = {
  bad_request: 400,
  validation_failed: 422,
  unprocessable: 422,
  unauthenticated: 401,
  forbidden: 403,
  csrf_failed: 403,
  not_found: 404,
  conflict: 409,
  stale_write: 409,
  rate_limited: 429,
  payload_too_large: 413,
  unavailable: 503,
  internal: 500,
};

export function sendError(res: Parameters<RequestHandler>[1], code: ErrorCode, message: string, details?: AppError['details'], current?: AppError['current']): void {
  const body: ErrorBody = { error: { code, message, ...(details ? { details } : {}), ...(current ? { current } : {}) } };
  res.status(STATUS_BY_CODE[code]).json(body);
}

/** 404 for any /api path no route claimed. */
export const apiNotFound: RequestHandler = (req, res) => {
  sendError(res, 'not_found', `No API route for ${req.method} ${req.path}.`);
};

/**
 * Errors that mean "the database is out of reach", not "this request is wrong": the server answers 503
 * `unavailable` and recovers by itself when PostgreSQL is back (pools make new connections).
 * SQLSTATE classes from the PostgreSQL manual, appendix A "PostgreSQL Error Codes": 08 connection exception,
 * 57P01 admin_shutdown (pg_ctl -m fast), 57P02 crash_shutdown, 57P03 cannot_connect_now (starting or stopping),
 * 53300 too_many_connections. The rest are Node socket errors (a stopped server's Unix-domain socket is
 * ENOENT on connect), knex's pool timeout and node-postgres's own words for a connection that ended under it.
 */
const UNAVAILABLE_SOCKET_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', 'EHOSTUNREACH', 'ENETUNREACH', 'EAI_AGAIN', 'ENOTFOUND']);
const UNAVAILABLE_SQLSTATES = new Set(['57P01', '57P02', '57P03', '53300']);
const UNAVAILABLE_WORDS = /Connection terminated|Connection ended unexpectedly|connection error|timeout exceeded when trying to connect|Knex: Timeout acquiring a connection|Client was closed/i;

export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
  if (err == null || typeof err !== 'object' || depth > 4) return false;
  const e = err as { code?: unknown; name?: unknown; message?: unknown; cause?: unknown; errors?: unknown };
  if (typeof e.code === 'string' && (UNAVAILABLE_SOCKET_CODES.has(e.code) || UNAVAILABLE_SQLSTATES.has(e.code) || /^08[0-9A-Z]{3}$/.test(e.code))) return true;
  // a Unix-domain socket whose server has stopped: PostgreSQL removes the socket file, so connect() finds nothing
  // there (ENOENT) where TCP would be refused; only a failed connect counts, not any missing file
  if ((e.code === 'ENOENT' || e.code === 'ECONNREFUSED') && (err as { syscall?: unknown }).syscall === 'connect') return true;
  if (e.name === 'KnexTimeoutError') return true;
  if (typeof e.message === 'string' && UNAVAILABLE_WORDS.test(e.message)) return true;
  // Node wraps the attempts of a multi-address connect in an AggregateError; drivers wrap with `cause`
  if (Array.isArray(e.errors) && e.errors.some((x) => isDatabaseUnavailable(x, depth + 1))) return true;
  return isDatabaseUnavailable(e.cause, depth + 1);
}

export const UNAVAILABLE_MESSAGE = 'The database is not reachable just now (it may be restarting). Nothing was saved; try again in a moment.';

interface HttpishError {
  status?: number;
  statusCode?: number;
  type?: string;
  code?: string;
}

export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err: unknown, req, res, next) => {
    if (res.headersSent) {
      next(err);
      return;
    }
    if (err instanceof AppError) {
      sendError(res, err.code, err.message, err.details, err.current);
      return;
    }
    const e = (err ?? {}) as HttpishError;
    // body-parser: malformed JSON and oversize bodies
    if (e.type === 'entity.parse.failed') {
      sendError(res, 'bad_request', 'The request body is not valid JSON (or holds a NUL character, which the server does not store).');
      return;
    }
    if (e.type === 'entity.too.large') {
      sendError(res, 'payload_too_large', 'The request body is larger than the server accepts.');
      return;
    }
    // csrf-sync raises an http-error with this code
    if (e.code === 'EBADCSRFTOKEN') {
      sendError(res, 'csrf_failed', 'The form token is missing or out of date. Reload the page and try again.');
      return;
    }
    if (isDatabaseUnavailable(err)) {
      logger.warn(`[${req.method} ${req.originalUrl}] database unavailable:`, (err as Error).message ?? err);
      sendError(res, 'unavailable', UNAVAILABLE_MESSAGE);
      return;
    }
    const status = e.status ?? e.statusCode;
    if (typeof status === 'number' && status >= 400 && status < 500) {
      sendError(res, status === 404 ? 'not_found' : status === 403 ? 'forbidden' : status === 401 ? 'unauthenticated' : 'bad_request', 'The request could not be handled.');
      return;
    }
    logger.error(`[${req.method} ${req.originalUrl}]`, err);
    sendError(res, 'internal', 'Something went wrong on the server. The error has been logged.');
  };
}
