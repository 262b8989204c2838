/**
 * The kind of each site's boundary bound in a layered host or with electrodes (issue 11): whether
 * the far-field bound is rigorous or an estimate, and why. The codes come from geometry/farfield
 * (layered.ts); the words are the CLI's own (server/contracts/farfieldWords.ts), so the panel and
 * `npm run cli -- check` say the same thing. No physics here.
 */
import type { FarFieldReport, SiteBound } from '../../../../../geometry/farfield';
import { BOUND_REASON_CLAUSE, BOUND_REASON_CODES, BOUND_REASON_WORDS, type BoundKindCode, type BoundReasonCode } from '@contracts/farfieldWords';

// The contract's codes and the core's must be the same unions (a new code in either fails the type check).
type BoundKind = NonNullable<SiteBound['boundKind']>;
type BoundReason = NonNullable<SiteBound['boundReason']>;
type Same<A, B> = [A] extends [B] ? ([B] extends [A] ? true : false) : false;
const reasonsAgree: Same<BoundReason, BoundReasonCode> = true;
const kindsAgree: Same<BoundKind, BoundKindCode> = true;
void reasonsAgree;
void kindsAgree;

/** True when the report gives bound kinds (a layered host or electrodes); a homogeneous host's bounds are all rigorous and carry none. */
export function hasBoundKinds(report: Pick<FarFieldReport, 'sites'>): boolean {
  return report.sites.some((s) => s.boundKind !== undefined);
}

/** A site's bound in words for a title or a screen reader: "rigorous: the largest potential …". */
export function boundWords(s: Pick<SiteBound, 'boundKind' | 'boundReason'>): string {
  if (s.boundReason) return BOUND_REASON_WORDS[s.boundReason];
  return s.boundKind ?? '';
}

/**
 * Sort key of the Bound column: rigorous before estimated, and within a kind the reasons in the
 * contract's order (so sites with the same reason stay together); null when the site has none.
 */
export function boundRank(s: Pick<SiteBound, 'boundKind' | 'boundReason'>): number | null {
  if (s.boundKind === undefined) return null;
  const reason = s.boundReason === undefined ? BOUND_REASON_CODES.length : BOUND_REASON_CODES.indexOf(s.boundReason);
  return (s.boundKind === 'estimated' ? 1 : 0) * (BOUND_REASON_CODES.length + 1) + reason;
}

export interface BoundGroup {
  kind: BoundKindCode;
  reason: BoundReasonCode | null;
  count: number;
  /** the reason's clause without its kind ("the largest potential on the walls …") */
  clause: string;
}

/**
 * The sites counted by kind and reason, rigorous first, then in the order the reasons first
 * appear in the site list (the CLI's "Boundary bounds in this stack" counts in that order too).
 */
export function boundSummary(sites: readonly Pick<SiteBound, 'boundKind' | 'boundReason'>[]): BoundGroup[] {
  const groups = new Map<string, BoundGroup>();
  for (const s of sites) {
    if (s.boundKind === undefined) continue;
    const key = `${s.boundKind}|${s.boundReason ?? ''}`;
    const g = groups.get(key);
    if (g) g.count++;
    else groups.set(key, { kind: s.boundKind, reason: s.boundReason ?? null, count: 1, clause: s.boundReason ? BOUND_REASON_CLAUSE[s.boundReason] : '' });
  }
  const all = [...groups.values()];
  return [...all.filter((g) => g.kind === 'rigorous'), ...all.filter((g) => g.kind !== 'rigorous')];
}

/** The summary in one line: "Boundary bounds in this stack: 12 sites rigorous — …; 4 sites estimated — …." */
export function boundSummaryText(groups: readonly BoundGroup[]): string {
  const parts = groups.map((g) => `${g.count} ${g.count === 1 ? 'site' : 'sites'} ${g.kind}${g.clause ? ` — ${g.clause}` : ''}`);
  return `Boundary bounds in this stack: ${parts.join('; ')}.`;
}
