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
    const status = e.status ?? e.statusCode;
    if (typeof status === 'number' && status >= 400 && status < 500) {
      sendError(res, status === 404 ? 'not_found' : status === 403 ? 'forbidden' : status === 401 ? 'unauthenticated' : 'bad_request', 'The request could not be handled.');
      return;
    }
    logger.error(`[${req.method} ${req.originalUrl}]`, err);
    sendError(res, 'internal', 'Something went wrong on the server. The error has been logged.');
  };
}
