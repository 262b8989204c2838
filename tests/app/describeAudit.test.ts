/**
 * The activity list's sentences (issue 8, item 14): every entry reads as a sentence with names,
 * never raw JSON or internal ids, and long values are shortened in the sentence and kept whole
 * for the expanded entry. The detail shapes are the ones the server's services write
 * (server/services/*.ts), so a renamed detail key shows up here.
 */
import { describe, expect, it } from 'vitest';
import { describeAuditEntry, shorten, SHORT } from '../../app/src/features/projects/describeAudit';

/** Marks of the old rendering: JSON punctuation, "user id", bare `key: value` pairs. */
function looksRaw(text: string): boolean {
  return /[{}[\]"]|user id|\bid\b|:\s*\{/i.test(text);
}

describe('describeAuditEntry', () => {
  it('names both people in a role change, not the user id', () => {
    const out = describeAuditEntry({
      actor: 'Odile Varga',
      subject: 'Tomasz Ilunga',
      action: 'member.role_change',
      detail: { userId: 2, email: 'tomasz@lab.example', from: 'viewer', to: 'editor' },
    });
    expect(out.summary).toBe('Odile Varga changed Tomasz Ilunga’s role from viewer to editor.');
    expect(looksRaw(out.summary)).toBe(false);
    expect(out.more).toEqual([]);
  });

  it('falls back to the address, then to "a former member", when the account is gone', () => {
    const base = { actor: 'Odile Varga', action: 'member.remove', detail: { userId: 9, email: 'gone@lab.example', role: 'viewer' } };
    expect(describeAuditEntry({ ...base, subject: null }).summary).toBe('Odile Varga removed gone@lab.example (viewer) from the project.');
    expect(describeAuditEntry({ ...base, subject: null, detail: { userId: 9, role: 'viewer' } }).summary).toBe('Odile Varga removed a former member (viewer) from the project.');
  });

  it('writes a rename as a sentence with both names, not the changed object', () => {
    const out = describeAuditEntry({
      actor: 'Odile Varga',
      action: 'project.update',
      detail: { changed: { name: { from: 'Quad dot A', to: 'Quad dot B' } }, version: 3 },
    });
    expect(out.summary).toBe('Odile Varga renamed the project from “Quad dot A” to “Quad dot B”.');
    expect(looksRaw(out.summary)).toBe(false);
  });

  it('shortens a 120-character name in the sentence and keeps it whole for the expanded entry', () => {
    const long = 'Q'.repeat(120); // the issue's unbroken 120-character name
    const out = describeAuditEntry({ actor: 'Odile Varga', action: 'project.update', detail: { changed: { name: { from: 'Short', to: long } } } });
    expect(out.summary).not.toContain(long);
    expect(out.summary).toContain(`“${'Q'.repeat(SHORT - 1)}…”`);
    expect(out.more).toEqual([{ label: 'New name', value: long }]);
  });

  it('puts a changed description in the expanded part, before and after', () => {
    const out = describeAuditEntry({
      actor: 'Odile Varga',
      action: 'project.update',
      detail: { changed: { description: { from: '', to: 'Four P donors, 4 nm apart, under one gate.' } } },
    });
    expect(out.summary).toBe('Odile Varga changed the project’s description.');
    expect(out.more).toEqual([
      { label: 'Description before', value: '(empty)' },
      { label: 'Description after', value: 'Four P donors, 4 nm apart, under one gate.' },
    ]);
  });

  it('says who invited whom and how many open invitations the new one replaced', () => {
    const out = describeAuditEntry({
      actor: 'Odile Varga',
      action: 'invitation.create',
      detail: { invitationId: 14, email: 'new@lab.example', role: 'editor', supersededOpenInvitations: 2 },
    });
    expect(out.summary).toBe('Odile Varga invited new@lab.example to join as editor, replacing 2 earlier open invitations.');
    expect(out.summary).not.toContain('14');
  });

  it('covers accept, revoke, leave, create and delete with sentences', () => {
    const cases: [string, Record<string, unknown>, string][] = [
      ['invitation.accept', { invitationId: 3, email: 'a@lab.example', role: 'viewer' }, 'Ama Reyes joined as viewer, accepting the invitation sent to a@lab.example.'],
      ['invitation.revoke', { invitationId: 3, email: 'a@lab.example', role: 'owner' }, 'Ama Reyes withdrew the invitation for a@lab.example to join as owner.'],
      ['member.leave', { userId: 4, email: 'a@lab.example', role: 'editor' }, 'Ama Reyes left the project (was editor).'],
      ['project.create', { name: 'Boron pair' }, 'Ama Reyes started the project “Boron pair”.'],
      ['project.delete', { projectId: 8, name: 'Boron pair' }, 'Ama Reyes deleted the project “Boron pair”.'],
      ['design.update', { version: 4, sites: 1, name: 'Chain' }, 'Ama Reyes saved the design “Chain” (version 4, 1 site).'],
    ];
    for (const [action, detail, sentence] of cases) expect(describeAuditEntry({ actor: 'Ama Reyes', action, detail }).summary).toBe(sentence);
  });

  it('writes the design events the designs service records', () => {
    const say = (action: string, detail: Record<string, unknown>) => describeAuditEntry({ actor: 'Ama Reyes', action, detail }).summary;
    expect(say('design.create', { designId: 7, name: 'Honeycomb flake', sites: 0 })).toBe('Ama Reyes started the design “Honeycomb flake” (0 sites).');
    expect(say('design.create', { designId: 8, name: 'Honeycomb flake (copy)', sites: 24, copyOf: 7 })).toBe('Ama Reyes duplicated a design as “Honeycomb flake (copy)” (24 sites).');
    expect(say('design.rename', { designId: 7, version: 3, from: 'Flake', to: 'Honeycomb flake' })).toBe('Ama Reyes renamed the design “Flake” to “Honeycomb flake”.');
    expect(say('design.delete', { designId: 7, name: 'Honeycomb flake', version: 3 })).toBe('Ama Reyes deleted the design “Honeycomb flake”.');
    for (const text of [say('design.create', { designId: 8, name: 'x', sites: 1, copyOf: 7 }), say('design.delete', { designId: 7, name: 'x', version: 3 })]) {
      expect(text).not.toMatch(/\b[78]\b/); // no design ids
    }
  });

  it('says when the actor no longer has an account', () => {
    expect(describeAuditEntry({ actor: null, action: 'member.leave', detail: { role: 'viewer' } }).summary).toMatch(/^Someone whose account no longer exists left/);
  });

  it('reads an unknown action in words, hides ids and spells nested details out', () => {
    const out = describeAuditEntry({ actor: 'Ama Reyes', action: 'mesh.create_revision', detail: { meshId: 5, elementCount: 1200, changed: { order: { from: 1, to: 2 } } } });
    expect(out.summary).toBe('Ama Reyes: mesh create revision.');
    expect(out.more).toEqual([
      { label: 'Element count', value: '1200' },
      { label: 'Changed', value: 'order 1 → 2' },
    ]);
    for (const m of out.more) expect(looksRaw(m.value)).toBe(false);
  });
});

describe('shorten', () => {
  it('keeps short text, cuts long text to the limit with an ellipsis, never splits a surrogate pair', () => {
    expect(shorten('abc', 5)).toBe('abc');
    expect(shorten('abcdef', 5)).toBe('abcd…');
    // U+1D4D0 (mathematical bold script A) is one code point, two UTF-16 units (Unicode 15, §3.9).
    const script = '\u{1D4D0}'.repeat(6);
    const cut = shorten(script, 5);
    expect(Array.from(cut)).toHaveLength(5);
    expect(cut.startsWith('\u{1D4D0}'.repeat(4))).toBe(true);
  });
});
