/**
 * Small pieces of client logic: links in captured mail and retry policy
 * (4xx answers are final per RFC 9110 §15.5, so retrying them only repeats the refusal).
 */
import { describe, expect, it } from 'vitest';
import { splitLinks } from '../../app/src/features/admin/linkify';
import { ApiError } from '../../app/src/lib/api';
import { shouldRetry } from '../../app/src/lib/queryClient';

describe('splitLinks', () => {
  const text = 'Hello,\n\nJoin here: http://127.0.0.1:8080/invite/AbC_123-xyz. It expires in 7 days.\nOr https://lab.example/reset/t0k.';
  const parts = splitLinks(text);

  it('finds every http(s) link, leaving sentence punctuation outside', () => {
    expect(parts.filter((p) => p.kind === 'link').map((p) => (p.kind === 'link' ? p.href : ''))).toEqual([
      'http://127.0.0.1:8080/invite/AbC_123-xyz',
      'https://lab.example/reset/t0k',
    ]);
  });

  it('loses no character of the message', () => {
    expect(parts.map((p) => (p.kind === 'link' ? p.href : p.text)).join('')).toBe(text);
  });

  it('returns plain text unchanged when there is no link', () => {
    expect(splitLinks('no links here')).toEqual([{ kind: 'text', text: 'no links here' }]);
  });
});

describe('shouldRetry', () => {
  it('never retries client errors, retries server and network failures twice', () => {
    for (const status of [400, 401, 403, 404, 409, 422, 429]) expect(shouldRetry(0, new ApiError(status, 'bad_request', ''))).toBe(false);
    for (const err of [new ApiError(500, 'internal', ''), new ApiError(0, 'network', ''), new Error('x')]) {
      expect(shouldRetry(0, err)).toBe(true);
      expect(shouldRetry(1, err)).toBe(true);
      expect(shouldRetry(2, err)).toBe(false);
    }
  });
});
