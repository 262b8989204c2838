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
