/**
 * Where to go after signing in. Only same-origin paths are honoured: `//evil.example` and
 * `https://...` would otherwise turn the sign-in page into an open redirect.
 */
export function safeNextPath(raw: string | null | undefined, fallback = '/projects'): string {
  if (!raw) return fallback;
  if (!raw.startsWith('/') || raw.startsWith('//') || raw.startsWith('/\\')) return fallback;
  // Control characters (including tab/newline, which URL parsing strips) are never part of our routes.
  for (let i = 0; i < raw.length; i++) if (raw.charCodeAt(i) < 0x20 || raw.charCodeAt(i) === 0x7f) return fallback;
  return raw;
}

/** A link to a sign-in or sign-up page that comes back to `next` afterwards. */
export function withNext(path: string, next: string | null | undefined, extra: Record<string, string> = {}): string {
  const params = new URLSearchParams(extra);
  const safe = safeNextPath(next, '');
  if (safe) params.set('next', safe);
  const q = params.toString();
  return q ? `${path}?${q}` : path;
}

/**
 * Where to go once the e-mailed confirmation link is followed. The link itself carries only
 * the token, so the sign-up page remembers `next` (e.g. the invitation page that sent the
 * person to sign up) in this browser; the confirmation page reads it back. Only a path that
 * passes `safeNextPath` is stored, and it is checked again when read.
 */
const AFTER_CONFIRM_KEY = 'tetrawell.afterConfirm';

function storage(): Storage | null {
  try {
    return typeof localStorage === 'undefined' ? null : localStorage;
  } catch {
    return null; // storage disabled: fall back to the project list
  }
}

export function rememberNextAfterConfirm(next: string | null | undefined): void {
  const safe = safeNextPath(next, '');
  const s = storage();
  if (!s) return;
  if (safe) s.setItem(AFTER_CONFIRM_KEY, safe);
  else s.removeItem(AFTER_CONFIRM_KEY);
}

/** The remembered path (validated again), or the fallback; does not forget it (see `forgetNextAfterConfirm`). */
export function nextAfterConfirm(fallback = '/projects'): string {
  return safeNextPath(storage()?.getItem(AFTER_CONFIRM_KEY), fallback);
}

export function forgetNextAfterConfirm(): void {
  storage()?.removeItem(AFTER_CONFIRM_KEY);
}
