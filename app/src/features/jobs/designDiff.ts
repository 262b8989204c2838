/**
 * What changed between the design versions two revisions were computed from: sites added, removed, moved (by id),
 * changed otherwise (species, electrons, orbital, cluster), the box (domain), the host and the refinement settings.
 * Pure, so tests run it in Node.
 */
import type { DesignDocument } from '@contracts/design';

/** a move shorter than this is no move (1e-9 nm, far below any lattice spacing; common practice) */
const MOVE_TOLERANCE_NM = 1e-9;

export interface DesignChanges {
  added: string[];
  removed: string[];
  moved: { id: string; distanceNm: number }[];
  /** same id and place, other species, electrons, orbital or cluster */
  changed: { id: string; what: string[] }[];
  /** lines such as "half-extents 12 × 12 × 12 nm → 14 × 12 × 12 nm" */
  box: string[];
  host: string[];
  refinement: string[];
}

const nm = (v: readonly number[]) => `${v.map((x) => +x.toFixed(4)).join(' × ')} nm`;
const at = (v: readonly number[]) => `(${v.map((x) => +x.toFixed(4)).join(', ')}) nm`;
const boundary = (b: DesignDocument['domain']['boundary']) => (b.kind === 'grounded' ? 'grounded walls' : `multipole walls of order ${b.order}`);

export function diffDesigns(a: DesignDocument, b: DesignDocument): DesignChanges {
  const before = new Map(a.sites.map((s) => [s.id, s]));
  const after = new Map(b.sites.map((s) => [s.id, s]));
  const out: DesignChanges = { added: [], removed: [], moved: [], changed: [], box: [], host: [], refinement: [] };
  for (const s of b.sites) if (!before.has(s.id)) out.added.push(s.id);
  for (const s of a.sites) {
    const t = after.get(s.id);
    if (!t) {
      out.removed.push(s.id);
      continue;
    }
    const d = Math.hypot(t.position[0] - s.position[0], t.position[1] - s.position[1], t.position[2] - s.position[2]);
    if (d > MOVE_TOLERANCE_NM) out.moved.push({ id: s.id, distanceNm: d });
    const what: string[] = [];
    if (s.species !== t.species) what.push(`species ${s.species} → ${t.species}`);
    if (s.electrons !== t.electrons) what.push(`electrons ${s.electrons} → ${t.electrons}`);
    if (JSON.stringify(s.orbital ?? null) !== JSON.stringify(t.orbital ?? null)) what.push('orbital');
    if ((s.cluster ?? '') !== (t.cluster ?? '')) what.push(`cluster ${s.cluster ?? 'none'} → ${t.cluster ?? 'none'}`);
    if (what.length) out.changed.push({ id: s.id, what });
  }
  const ea = a.domain, eb = b.domain;
  if (ea.halfExtentsNm.some((h, k) => h !== eb.halfExtentsNm[k])) out.box.push(`half-extents ${nm(ea.halfExtentsNm)} → ${nm(eb.halfExtentsNm)}`);
  if (ea.center.some((c, k) => c !== eb.center[k])) out.box.push(`centre ${at(ea.center)} → ${at(eb.center)}`);
  if (boundary(ea.boundary) !== boundary(eb.boundary)) out.box.push(`${boundary(ea.boundary)} → ${boundary(eb.boundary)}`);
  if (a.host.epsilonR !== b.host.epsilonR) out.host.push(`relative permittivity ${a.host.epsilonR} → ${b.host.epsilonR} (no unit)`);
  if (a.host.latticeConstantNm !== b.host.latticeConstantNm) out.host.push(`lattice constant ${a.host.latticeConstantNm} nm → ${b.host.latticeConstantNm} nm`);
  if (a.host.material !== b.host.material) out.host.push(`material ${a.host.material} → ${b.host.material}`);
  const ra = a.refinement, rb = b.refinement;
  if (ra.order !== rb.order) out.refinement.push(`default order P${ra.order} → P${rb.order}`);
  if (ra.targetRelError !== rb.targetRelError) out.refinement.push(`target relative error ${ra.targetRelError} → ${rb.targetRelError} (no unit)`);
  if (ra.maxElements !== rb.maxElements) out.refinement.push(`element budget ${ra.maxElements.toLocaleString('en-US')} → ${rb.maxElements.toLocaleString('en-US')} elements`);
  return out;
}

/** a few ids, then "and N more" */
export function idList(ids: string[], max = 8): string {
  return ids.length <= max ? ids.join(', ') : `${ids.slice(0, max).join(', ')} and ${ids.length - max} more`;
}

/** the changes as lines for people; an empty list when the two documents compute the same thing */
export function describeChanges(c: DesignChanges): string[] {
  const lines: string[] = [];
  if (c.added.length) lines.push(`${c.added.length} site${c.added.length === 1 ? '' : 's'} added: ${idList(c.added)}`);
  if (c.removed.length) lines.push(`${c.removed.length} site${c.removed.length === 1 ? '' : 's'} removed: ${idList(c.removed)}`);
  if (c.moved.length) {
    const shown = c.moved.slice(0, 8).map((m) => `${m.id} by ${+m.distanceNm.toFixed(4)} nm`);
    lines.push(`${c.moved.length} site${c.moved.length === 1 ? '' : 's'} moved: ${shown.join(', ')}${c.moved.length > 8 ? ` and ${c.moved.length - 8} more` : ''}`);
  }
  for (const ch of c.changed.slice(0, 8)) lines.push(`site ${ch.id}: ${ch.what.join(', ')}`);
  if (c.changed.length > 8) lines.push(`${c.changed.length - 8} more sites changed otherwise`);
  for (const l of c.box) lines.push(`box: ${l}`);
  for (const l of c.host) lines.push(`host: ${l}`);
  for (const l of c.refinement) lines.push(`refinement: ${l}`);
  return lines;
}
