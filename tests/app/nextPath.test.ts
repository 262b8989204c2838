/**
 * After sign-in the app goes back to `?next=`. Only same-origin paths may pass, or the sign-in
 * page becomes an open redirect (OWASP Unvalidated Redirects and Forwards Cheat Sheet).
 * Independent reference: the WHATWG URL parser (Node's URL), which resolves each accepted value
 * against our origin; whatever we accept must stay on that origin.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { forgetNextAfterConfirm, nextAfterConfirm, rememberNextAfterConfirm, safeNextPath, withNext } from '../../app/src/lib/nextPath';

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

describe('next after the e-mailed confirmation link', () => {
  // a Map-backed stand-in for the browser's localStorage (Web Storage API: getItem/setItem/removeItem)
  let store: Map<string, string>;
  beforeEach(() => {
    store = new Map();
    vi.stubGlobal('localStorage', {
      getItem: (k: string) => store.get(k) ?? null,
      setItem: (k: string, v: string) => void store.set(k, String(v)),
      removeItem: (k: string) => void store.delete(k),
    });
  });
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  it('remembers a safe path until forgotten', () => {
    rememberNextAfterConfirm('/invite/tok123');
    expect(nextAfterConfirm()).toBe('/invite/tok123');
    expect(nextAfterConfirm()).toBe('/invite/tok123');
    forgetNextAfterConfirm();
    expect(nextAfterConfirm()).toBe('/projects');
  });

  it.each(candidates)('never leads off the origin for %j, even when planted in storage', (raw) => {
    rememberNextAfterConfirm(raw);
    expect(new URL(nextAfterConfirm(), ORIGIN).origin).toBe(ORIGIN);
    // a value written into storage by other means is checked again when read
    store.set('tetrawell.afterConfirm', raw);
    expect(new URL(nextAfterConfirm(), ORIGIN).origin).toBe(ORIGIN);
  });

  it('a sign-up without next clears an older remembered path', () => {
    rememberNextAfterConfirm('/invite/old');
    rememberNextAfterConfirm(null);
    expect(nextAfterConfirm()).toBe('/projects');
  });

  it('falls back quietly when storage is unavailable', () => {
    vi.stubGlobal('localStorage', undefined);
    rememberNextAfterConfirm('/invite/x');
    expect(nextAfterConfirm('/fallback')).toBe('/fallback');
  });
});
