/**
 * The one fetch wrapper every endpoint file goes through.
 *
 * - JSON in, JSON out, cookies on the same origin (the session lives in an httpOnly cookie).
 * - Every state-changing request carries the synchronizer token in `x-csrf-token`. The token
 *   is fetched once from GET /api/auth/csrf and cached here; it is tied to the session, so it
 *   must be forgotten whenever the session is regenerated (sign-in, sign-up, sign-out).
 *   If the server still answers `csrf_failed` (e.g. the session expired in another tab) we
 *   fetch a fresh token and retry that request once.
 * - Failures become a typed ApiError carrying the server's `{ error: { code, message, details } }`.
 * - Successful bodies are checked against the contract's zod schema when one is given, so a
 *   drift between client and server shows up as a clear error instead of undefined fields.
 */
import { z } from 'zod';
import { csrfResponseSchema, errorBodySchema, type ErrorCode } from '@contracts/api';

export interface FieldIssue {
  path: (string | number)[];
  message: string;
}

export interface StaleCurrent {
  version: number;
  updatedAt: string;
  updatedBy: string | null;
}

export type ApiErrorCode = ErrorCode | 'network' | 'unexpected_response';

export class ApiError extends Error {
  readonly status: number;
  readonly code: ApiErrorCode;
  readonly details: FieldIssue[];
  /** On a 409 `stale_write` of a design: the version that is now current, who saved it and when. */
  readonly current: StaleCurrent | null;

  constructor(status: number, code: ApiErrorCode, message: string, details: FieldIssue[] = [], current: StaleCurrent | null = null) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
    this.current = current;
  }

  /** A write lost a race: someone saved a newer version first (HTTP 409). */
  get isConflict(): boolean {
    return this.status === 409;
  }
}

const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);
const CSRF_PATH = '/api/auth/csrf';

let csrfToken: string | null = null;
let csrfInFlight: Promise<string> | null = null;
// Bumped on every forget, so a token request that was already under way when the session
// changed cannot store its (old-session) token afterwards.
let csrfGeneration = 0;

/** Drop the cached CSRF token; the next write fetches a fresh one. Call after the session changes. */
export function forgetCsrfToken(): void {
  csrfToken = null;
  csrfInFlight = null;
  csrfGeneration++;
}

async function currentCsrfToken(): Promise<string> {
  if (csrfToken) return csrfToken;
  // Several writes fired together share one token request.
  const generation = csrfGeneration;
  csrfInFlight ??= send(CSRF_PATH, { method: 'GET' }, csrfResponseSchema).then(
    (r) => {
      if (generation === csrfGeneration) {
        csrfToken = r.csrfToken;
        csrfInFlight = null;
      }
      return r.csrfToken;
    },
    (err: unknown) => {
      if (generation === csrfGeneration) csrfInFlight = null;
      throw err;
    },
  );
  return csrfInFlight;
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  signal?: AbortSignal;
}

/** Call the API. With a schema the parsed body is returned; without, the raw JSON (or undefined for 204). */
export async function api<T>(path: string, options: RequestOptions, schema: z.ZodType<T>): Promise<T>;
export async function api(path: string, options?: RequestOptions): Promise<unknown>;
export async function api<T>(path: string, options: RequestOptions = {}, schema?: z.ZodType<T>): Promise<T> {
  const method = options.method ?? 'GET';
  if (!UNSAFE.has(method)) return send(path, options, schema);
  try {
    return await send(path, options, schema, await currentCsrfToken());
  } catch (err) {
    if (err instanceof ApiError && err.code === 'csrf_failed') {
      forgetCsrfToken();
      return send(path, options, schema, await currentCsrfToken());
    }
    throw err;
  }
}

// Without a schema the caller asked for `unknown`, so the unchecked cast to T is sound there.
async function send<T>(path: string, options: RequestOptions, schema?: z.ZodType<T>, token?: string): Promise<T> {
  const headers: Record<string, string> = { accept: 'application/json' };
  // A FormData body (a file upload) sets its own multipart content type with the boundary.
  const isForm = typeof FormData !== 'undefined' && options.body instanceof FormData;
  if (options.body !== undefined && !isForm) headers['content-type'] = 'application/json';
  if (token) headers['x-csrf-token'] = token;

  let res: Response;
  try {
    res = await fetch(path, {
      method: options.method ?? 'GET',
      headers,
      body: options.body === undefined ? undefined : isForm ? (options.body as FormData) : JSON.stringify(options.body),
      credentials: 'same-origin',
      signal: options.signal,
    });
  } catch (err) {
    if (err instanceof DOMException && err.name === 'AbortError') throw err;
    throw new ApiError(0, 'network', 'Could not reach the Tetrawell server. Check your connection and try again.');
  }

  const payload = await readJson(res);
  if (!res.ok) throw toApiError(res.status, payload);
  if (!schema) return payload as T;
  const parsed = schema.safeParse(payload);
  if (!parsed.success) {
    throw new ApiError(res.status, 'unexpected_response', 'The server answered in a shape this page does not understand. Reload the page; if it persists, report it.');
  }
  return parsed.data;
}

async function readJson(res: Response): Promise<unknown> {
  if (res.status === 204) return undefined;
  const text = await res.text();
  if (!text) return undefined;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return undefined;
  }
}

/** Fallback codes for answers that do not carry the error envelope (e.g. a proxy's 502 page). */
function codeForStatus(status: number): ErrorCode {
  switch (status) {
    case 400: return 'bad_request';
    case 401: return 'unauthenticated';
    case 403: return 'forbidden';
    case 404: return 'not_found';
    case 409: return 'conflict';
    case 422: return 'validation_failed';
    case 429: return 'rate_limited';
    default: return 'internal';
  }
}

/** Turn a non-2xx answer into an ApiError, keeping the server's code, message and field details. */
export function toApiError(status: number, payload: unknown): ApiError {
  const parsed = errorBodySchema.safeParse(payload);
  if (parsed.success) {
    const { code, message, details, current } = parsed.data.error;
    return new ApiError(status, code, message, details ?? [], current ?? null);
  }
  const message = status === 429 ? 'Too many attempts. Wait a minute and try again.' : `The server answered ${status}. Try again in a moment.`;
  return new ApiError(status, codeForStatus(status), message);
}

/**
 * The contracts fix the shape of a single resource but not whether a route answers it bare
 * (`{ id, ... }`) or wrapped (`{ project: { id, ... } }`). Accept both, return the resource.
 */
export function bareOrWrapped<T>(key: string, schema: z.ZodType<T>): z.ZodType<T> {
  const wrapped = z.object({ [key]: schema }).transform((w) => w[key] as T);
  return z.union([schema, wrapped]) as unknown as z.ZodType<T>;
}
