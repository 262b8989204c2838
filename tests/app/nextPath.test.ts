/**
 * After sign-in the app goes back to `?next=`. Only same-origin paths may pass, or the sign-in
 * page becomes an open redirect (OWASP Unvalidated Redirects and Forwards Cheat Sheet).
 * Independent reference: the WHATWG URL parser (Node's URL), which resolves each accepted value
 * against our origin; whatever we accept must stay on that origin.
 */
import { describe, expect, it } from 'vitest';
import { safeNextPath, withNext } from '../../app/src/lib/nextPath';

const ORIGIN = 'https://tetrawell.lab.example';
const candidates = [
  '/projects/12',
  '/invite/abcDEF0123456789-_?x=1#y',
  '//evil.example/path',
  '/\\evil.example',
  '\\\\evil.example',
  'https://evil.example/',
  'javascript:alert(1)',
  '/\t/evil.example',
  '/\n/evil.example',
  'projects',
  '',
];

describe('safeNextPath', () => {
  it.each(candidates)('never leaves the origin for %j', (raw) => {
    const out = safeNextPath(raw, '/projects');
    expect(new URL(out, ORIGIN).origin).toBe(ORIGIN);
  });

  it('keeps ordinary in-app paths unchanged', () => {
    expect(safeNextPath('/projects/12')).toBe('/projects/12');
    expect(safeNextPath('/invite/abcDEF0123456789-_?x=1#y')).toBe('/invite/abcDEF0123456789-_?x=1#y');
  });

  it('falls back for anything that is not a plain same-origin path', () => {
    for (const raw of ['//evil.example/path', '/\\evil.example', 'https://evil.example/', '/\t/evil.example', null, undefined]) {
      expect(safeNextPath(raw, '/fallback')).toBe('/fallback');
    }
  });
});

describe('withNext', () => {
  it('adds next and extra parameters, URL-encoded, and drops an unsafe next', () => {
    const href = withNext('/sign-in', '/invite/tok?x=1', { email: 'a+b@lab.example' });
    const u = new URL(href, ORIGIN);
    expect(u.pathname).toBe('/sign-in');
    expect(u.searchParams.get('next')).toBe('/invite/tok?x=1');
    expect(u.searchParams.get('email')).toBe('a+b@lab.example');
    expect(new URL(withNext('/sign-in', '//evil.example'), ORIGIN).searchParams.has('next')).toBe(false);
  });
});
