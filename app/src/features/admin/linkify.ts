/**
 * Split captured e-mail text into plain runs and http(s) links, so the mail room can make the
 * invitation and reset links clickable without injecting any HTML.
 */
export type TextPart = { kind: 'text'; text: string } | { kind: 'link'; href: string };

const URL_RE = /https?:\/\/[^\s<>"')\]]+/g;

export function splitLinks(text: string): TextPart[] {
  const parts: TextPart[] = [];
  let last = 0;
  for (const m of text.matchAll(URL_RE)) {
    const start = m.index ?? 0;
    // Sentence punctuation right after a link belongs to the sentence, not the URL.
    const href = m[0].replace(/[.,;:!?]+$/, '');
    if (start > last) parts.push({ kind: 'text', text: text.slice(last, start) });
    parts.push({ kind: 'link', href });
    last = start + href.length;
  }
  if (last < text.length) parts.push({ kind: 'text', text: text.slice(last) });
  return parts;
}
