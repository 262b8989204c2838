/**
 * Audit entries arrive as a dotted action code (e.g. `member.role_change`), the actor's display
 * name, the display name of the member the entry concerns (`subject`, when it names one) and a
 * free detail object. Turn each into one plain sentence with names, never raw JSON or ids.
 *
 * Long values (a changed description, a 120-character name) are shortened in the sentence and
 * given in full in `more`, which the activity list shows when the entry is expanded. Codes this
 * file does not know yet (later issues add mesh and solve events) still read as a sentence.
 */

export interface AuditEntryLike {
  actor: string | null;
  action: string;
  detail: Record<string, unknown>;
  subject?: string | null;
}

export interface AuditSentence {
  /** One sentence ending in a full stop. */
  summary: string;
  /** Facts at full length, for the expanded entry; empty when the summary already says everything. */
  more: { label: string; value: string }[];
}

/** Longest quoted value kept whole inside a sentence (common practice: about one line of the list). */
export const SHORT = 60;

export function shorten(text: string, max = SHORT): string {
  const chars = Array.from(text); // by code point, so a surrogate pair is never split
  return chars.length > max ? `${chars.slice(0, max - 1).join('')}…` : text;
}

const ROLE_WORDS: Record<string, string> = { owner: 'owner', editor: 'editor', viewer: 'viewer' };
const role = (v: unknown) => (typeof v === 'string' ? (ROLE_WORDS[v] ?? v) : 'member');
const str = (v: unknown): string | null => (typeof v === 'string' && v.length > 0 ? v : null);
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString('en')} ${n === 1 ? one : many}`;

/** "Words like this" from a dotted or camel-cased code. */
export function humanize(code: string): string {
  return code
    .replace(/([a-z0-9])([A-Z])/g, '$1 $2')
    .replace(/[._-]+/g, ' ')
    .trim()
    .toLowerCase();
}

/** A value of an unknown detail, in words: nested objects become "a → b" or "key value" lists. */
function valueWords(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (typeof v === 'string') return v;
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  if (Array.isArray(v)) return v.map(valueWords).join(', ');
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if ('from' in o || 'to' in o) return `${valueWords(o.from)} → ${valueWords(o.to)}`;
    return Object.entries(o)
      .map(([k, x]) => `${humanize(k)} ${valueWords(x)}`)
      .join('; ');
  }
  return String(v);
}

/** Builds a sentence while collecting the long values it had to shorten. */
class Sentence {
  readonly more: { label: string; value: string }[] = [];
  quote(label: string, value: string): string {
    const short = shorten(value);
    if (short !== value) this.more.push({ label, value });
    return `“${short}”`;
  }
  done(summary: string): AuditSentence {
    return { summary: /[.!?]$/.test(summary) ? summary : `${summary}.`, more: this.more };
  }
}

export function describeAuditEntry(entry: AuditEntryLike): AuditSentence {
  const d = entry.detail ?? {};
  const who = entry.actor ?? 'Someone whose account no longer exists';
  const s = new Sentence();
  // The person an entry concerns: their current name, else the address it was sent to.
  const member = () => entry.subject ?? str(d.email) ?? 'a former member';

  switch (entry.action) {
    case 'project.create':
      return s.done(`${who} started the project${str(d.name) ? ` ${s.quote('Name', str(d.name)!)}` : ''}`);
    case 'project.delete':
      return s.done(`${who} deleted the project${str(d.name) ? ` ${s.quote('Name', str(d.name)!)}` : ''}`);
    case 'project.update': {
      const changed = (d.changed && typeof d.changed === 'object' ? d.changed : {}) as Record<string, { from?: unknown; to?: unknown } | undefined>;
      const parts: string[] = [];
      if (changed.name) {
        parts.push(`renamed the project from ${s.quote('Old name', String(changed.name.from ?? ''))} to ${s.quote('New name', String(changed.name.to ?? ''))}`);
      }
      if (changed.description) {
        const to = String(changed.description.to ?? '');
        parts.push(to ? 'changed its description' : 'cleared its description');
        s.more.push({ label: 'Description before', value: String(changed.description.from ?? '') || '(empty)' });
        s.more.push({ label: 'Description after', value: to || '(empty)' });
      }
      if (parts.length === 0) return s.done(`${who} saved the project details without changes`);
      if (!changed.name) parts[0] = parts[0].replace('its', 'the project’s');
      return s.done(`${who} ${parts.join(' and ')}`);
    }
    case 'invitation.create': {
      const superseded = num(d.supersededOpenInvitations) ?? 0;
      const tail = superseded > 0 ? `, replacing ${plural(superseded, 'earlier open invitation')}` : '';
      return s.done(`${who} invited ${str(d.email) ?? 'someone'} to join as ${role(d.role)}${tail}`);
    }
    case 'invitation.revoke':
      return s.done(`${who} withdrew the invitation for ${str(d.email) ?? 'someone'} to join as ${role(d.role)}`);
    case 'invitation.accept':
      return s.done(`${who} joined as ${role(d.role)}, accepting the invitation sent to ${str(d.email) ?? 'their address'}`);
    case 'member.role_change':
      return s.done(`${who} changed ${member()}’s role from ${role(d.from)} to ${role(d.to)}`);
    case 'member.remove':
      return s.done(`${who} removed ${member()} (${role(d.role)}) from the project`);
    case 'member.leave':
      return s.done(`${who} left the project (was ${role(d.role)})`);
  }

  // Designs (server/services/designs.ts): create { name, sites, copyOf? }, update { name, version,
  // sites }, rename { from, to, version }, delete { name, version }.
  if (entry.action.startsWith('design.')) {
    const name = str(d.name) ?? str(d.to);
    const quoted = name ? ` ${s.quote('Design', name)}` : '';
    const version = num(d.version);
    const sites = num(d.sites);
    const facts = [version !== null ? `version ${version}` : '', sites !== null ? plural(sites, 'site') : ''].filter(Boolean).join(', ');
    const tail = facts ? ` (${facts})` : '';
    switch (entry.action) {
      case 'design.create':
        return s.done(d.copyOf !== undefined ? `${who} duplicated a design as${quoted}${tail}` : `${who} started the design${quoted}${tail}`);
      case 'design.rename':
        return s.done(str(d.from) ? `${who} renamed the design ${s.quote('Old name', str(d.from)!)} to${quoted}` : `${who} renamed a design to${quoted}`);
      case 'design.delete':
        return s.done(`${who} deleted the design${quoted}`);
      case 'design.update':
        return s.done(`${who} saved the design${quoted}${tail}`);
    }
  }

  // Anything else: the code in words, then each detail as "key value" in the expanded entry.
  for (const [k, v] of Object.entries(d)) {
    if (v === null || v === undefined || /(^|[a-z])Id$|^id$/.test(k)) continue; // internal ids mean nothing to a reader
    const label = humanize(k);
    s.more.push({ label: label.charAt(0).toUpperCase() + label.slice(1), value: valueWords(v) });
  }
  return s.done(`${who}: ${humanize(entry.action)}`);
}
