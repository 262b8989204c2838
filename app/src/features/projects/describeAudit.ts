/**
 * Audit actions arrive as dotted codes (e.g. `invitation.create`, `member.role_change`).
 * Turn them into short plain phrases, and the detail object into a compact line, without
 * needing to know every code: later issues add design and mesh events.
 */
export function describeAction(action: string): string {
  const words = action.replace(/[._-]+/g, ' ').trim();
  return words.length > 0 ? words[0].toUpperCase() + words.slice(1) : action;
}

export function describeDetail(detail: Record<string, unknown>): string {
  const parts: string[] = [];
  for (const [key, value] of Object.entries(detail)) {
    if (value === null || value === undefined) continue;
    const shown = typeof value === 'object' ? JSON.stringify(value) : String(value);
    parts.push(`${key.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase()}: ${shown.length > 80 ? `${shown.slice(0, 77)}…` : shown}`);
  }
  return parts.join(' · ');
}
