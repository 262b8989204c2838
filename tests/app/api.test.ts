/**
 * The client's fetch wrapper against the API's published rules:
 * - error envelope `{ error: { code, message, details } }` from server/contracts/api.ts (errorBodySchema);
 * - the synchronizer-token CSRF pattern (OWASP CSRF Prevention Cheat Sheet): the token goes in a
 *   custom header on state-changing methods only, never on safe ones (RFC 9110 §9.2.1);
 * - status codes as RFC 9110 §15 defines them.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { errorBodySchema, projectSchema, type ErrorBody } from '@contracts/api';
import { ApiError, api, bareOrWrapped, forgetCsrfToken, toApiError } from '../../app/src/lib/api';

interface Call {
  url: string;
  method: string;
  headers: Record<string, string>;
  body: string | undefined;
}

function json(status: number, body: unknown): Response {
  return new Response(body === undefined ? null : JSON.stringify(body), { status, headers: { 'content-type': 'application/json' } });
}

/** A fake server: answers the CSRF route with successive tokens, everything else through `handler`. */
function fakeServer(handler: (call: Call, n: number) => Response) {
  const calls: Call[] = [];
  let tokens = 0;
  let n = 0;
  const fetchMock = vi.fn(async (url: string, init: RequestInit = {}) => {
    const call: Call = { url, method: init.method ?? 'GET', headers: { ...(init.headers as Record<string, string>) }, body: init.body as string | undefined };
    calls.push(call);
    if (url === '/api/auth/csrf') return json(200, { csrfToken: `token-${++tokens}` });
    return handler(call, n++);
  });
  vi.stubGlobal('fetch', fetchMock);
  return { calls, apiCalls: () => calls.filter((c) => c.url !== '/api/auth/csrf') };
}

beforeEach(() => forgetCsrfToken());
afterEach(() => vi.unstubAllGlobals());

describe('CSRF header', () => {
  it('is not sent on GET, and no token is fetched for reads', async () => {
    const srv = fakeServer(() => json(200, { ok: true }));
    await api('/api/projects');
    expect(srv.calls.map((c) => c.url)).toEqual(['/api/projects']);
    expect(srv.calls[0].headers['x-csrf-token']).toBeUndefined();
  });

  it.each(['POST', 'PUT', 'PATCH', 'DELETE'] as const)('is sent on %s with the token from /api/auth/csrf', async (method) => {
    const srv = fakeServer(() => json(200, {}));
    await api('/api/projects/1', { method, body: { version: 1 } });
    const write = srv.apiCalls()[0];
    expect(write.method).toBe(method);
    expect(write.headers['x-csrf-token']).toBe('token-1');
    expect(write.headers['content-type']).toBe('application/json');
    expect(JSON.parse(write.body!)).toEqual({ version: 1 });
  });

  it('is fetched once for several writes, and again after forgetCsrfToken (new session)', async () => {
    const srv = fakeServer(() => json(200, {}));
    await Promise.all([api('/a', { method: 'POST' }), api('/b', { method: 'POST' })]);
    await api('/c', { method: 'POST' });
    expect(srv.calls.filter((c) => c.url === '/api/auth/csrf')).toHaveLength(1);
    forgetCsrfToken();
    await api('/d', { method: 'POST' });
    expect(srv.apiCalls().map((c) => c.headers['x-csrf-token'])).toEqual(['token-1', 'token-1', 'token-1', 'token-2']);
  });

  it('is refreshed and the write retried once when the server answers csrf_failed', async () => {
    const refusal: ErrorBody = { error: { code: 'csrf_failed', message: 'The form token is out of date.' } };
    const srv = fakeServer((_c, n) => (n === 0 ? json(403, refusal) : json(201, { id: 7 })));
    await expect(api('/api/projects', { method: 'POST', body: { name: 'x' } })).resolves.toEqual({ id: 7 });
    expect(srv.apiCalls().map((c) => c.headers['x-csrf-token'])).toEqual(['token-1', 'token-2']);
  });

  it('does not loop when the retry is refused too', async () => {
    const refusal: ErrorBody = { error: { code: 'csrf_failed', message: 'no' } };
    const srv = fakeServer(() => json(403, refusal));
    await expect(api('/x', { method: 'POST' })).rejects.toMatchObject({ status: 403, code: 'csrf_failed' });
    expect(srv.apiCalls()).toHaveLength(2);
  });
});

describe('errors', () => {
  it('keeps the server’s code, message and field details', async () => {
    const body: ErrorBody = {
      error: { code: 'validation_failed', message: 'Check the highlighted fields.', details: [{ path: ['email'], message: 'Invalid email address' }] },
    };
    expect(errorBodySchema.safeParse(body).success).toBe(true); // the fixture itself obeys the contract
    fakeServer(() => json(422, body));
    const err = await api('/api/auth/sign-up', { method: 'POST', body: {} }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ApiError);
    expect(err).toMatchObject({ status: 422, code: 'validation_failed', message: body.error.message, details: body.error.details });
  });

  it('marks 409 answers as conflicts (RFC 9110 §15.5.10) and nothing else', () => {
    for (const status of [400, 401, 403, 404, 409, 422, 429, 500]) {
      expect(toApiError(status, undefined).isConflict).toBe(status === 409);
    }
  });

  it('falls back to a code from the status when the body is not the envelope (e.g. a proxy page)', () => {
    // Status meanings per RFC 9110 §15 (and RFC 6585 §4 for 429).
    const expected: Record<number, string> = { 400: 'bad_request', 401: 'unauthenticated', 403: 'forbidden', 404: 'not_found', 409: 'conflict', 422: 'validation_failed', 429: 'rate_limited', 502: 'internal' };
    for (const [status, code] of Object.entries(expected)) {
      const e = toApiError(Number(status), '<html>Bad gateway</html>');
      expect(e.code).toBe(code);
      expect(e.details).toEqual([]);
      expect(e.message.length).toBeGreaterThan(0);
    }
  });

  it('reports an unreachable server as a network error with status 0', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => { throw new TypeError('fetch failed'); }));
    await expect(api('/api/health')).rejects.toMatchObject({ status: 0, code: 'network' });
  });

  it('rejects a success body that breaks the contract instead of passing undefined fields on', async () => {
    fakeServer(() => json(200, { projects: [{ id: 'one' }] }));
    await expect(api('/api/projects', {}, z.object({ projects: z.array(projectSchema) }))).rejects.toMatchObject({ code: 'unexpected_response' });
  });

  it('returns undefined for 204 No Content', async () => {
    fakeServer(() => new Response(null, { status: 204 }));
    await expect(api('/api/projects/3', { method: 'DELETE' })).resolves.toBeUndefined();
  });
});

describe('bareOrWrapped', () => {
  const project = {
    id: 4, name: 'n', description: '', role: 'owner', capabilities: ['project.read'], version: 1,
    createdAt: '2026-01-01T00:00:00Z', updatedAt: '2026-01-01T00:00:00Z',
  };
  const schema = bareOrWrapped('project', projectSchema);
  it('accepts the resource bare or under its key and returns the same resource', () => {
    expect(schema.parse(project)).toEqual(project);
    expect(schema.parse({ project })).toEqual(project);
  });
  it('still rejects a wrong shape', () => {
    expect(schema.safeParse({ project: { id: 4 } }).success).toBe(false);
  });
});

describe('CSRF token and session changes', () => {
  it('does not keep a token fetched for the old session when forgotten mid-request', async () => {
    let release: (() => void) | null = null;
    let tokens = 0;
    const seen: string[] = [];
    vi.stubGlobal(
      'fetch',
      vi.fn(async (url: string, init: RequestInit = {}) => {
        if (url === '/api/auth/csrf') {
          const n = ++tokens;
          if (n === 1) await new Promise<void>((r) => (release = r)); // the old session's token arrives late
          return json(200, { csrfToken: `token-${n}` });
        }
        seen.push((init.headers as Record<string, string>)['x-csrf-token']);
        return json(200, {});
      }),
    );
    const early = api('/early', { method: 'POST' });
    await vi.waitFor(() => expect(release).not.toBeNull());
    forgetCsrfToken(); // e.g. sign-in finished in the meantime
    release!();
    await early;
    await api('/later', { method: 'POST' });
    // The later write must use a token fetched after the session changed.
    expect(seen).toEqual(['token-1', 'token-2']);
  });
});
