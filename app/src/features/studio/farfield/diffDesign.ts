/**
 * What changed between two versions of a design document, as the far-field session's changes
 * (geometry/farfield/session.ts): sites by id (removed, added or replaced, and the new order
 * only when it differs from what removal and appending give), and the name, host, domain box
 * and refinement fields when they differ. Editors replace what they change and keep the rest by
 * reference, so most comparisons stop at `===`; the field comparison catches copies.
 * A first document, one whose ids repeat, or one whose layers, electrodes or electrode walls
 * changed is sent whole (`reset`).
 */
import type { DesignDocument } from '@contracts/design';
import type { FarFieldChanges } from '../../../../../geometry/farfield';
import type { Design, Orbital, Site } from '../../../../../geometry/design/types';
import { sameOrbital as sameDensity } from '../../../../../geometry/density';

export type DesignDiff =
  | { kind: 'reset'; design: Design }
  | { kind: 'changes'; changes: FarFieldChanges }
  | { kind: 'none' };

const sameVec = (p: readonly number[], q: readonly number[]) => p === q || (p.length === q.length && p.every((x, i) => x === q[i]));

function sameOrbital(a: Orbital | undefined, b: Orbital | undefined): boolean {
  if (a === b) return true;
  return !!a && !!b && sameDensity(a, b);
}

export function sameSite(a: Site, b: Site): boolean {
  return (
    a === b ||
    (a.id === b.id && a.species === b.species && a.electrons === b.electrons && a.cluster === b.cluster && sameVec(a.position, b.position) && sameOrbital(a.orbital, b.orbital))
  );
}

const sameHost = (a: Design['host'], b: Design['host']) => a === b || (a.material === b.material && a.epsilonR === b.epsilonR && a.latticeConstantNm === b.latticeConstantNm);
const sameDomain = (a: Design['domain'], b: Design['domain']) =>
  a === b ||
  (sameVec(a.center, b.center) &&
    sameVec(a.halfExtentsNm, b.halfExtentsNm) &&
    a.boundary.kind === b.boundary.kind &&
    (a.boundary.kind !== 'multipole' || a.boundary.order === (b.boundary as typeof a.boundary).order));
const sameRefinement = (a: Design['refinement'], b: Design['refinement']) =>
  a === b || (a.order === b.order && a.targetRelError === b.targetRelError && a.maxElements === b.maxElements);

/**
 * The device parts of issue 11 (host layers, electrodes, the electrodes' walls): rare edits that
 * can change every figure, so a change sends the whole document (the session's change list has no
 * field for them; without this the worker would keep checking the old stack).
 */
const sameJson = (a: unknown, b: unknown) => a === b || JSON.stringify(a) === JSON.stringify(b);
const sameDevice = (a: DesignDocument, b: DesignDocument) =>
  sameJson(a.host.layers, b.host.layers) && sameJson(a.electrodes, b.electrodes) && a.domain.electrodeWalls === b.domain.electrodeWalls;

export function diffDesign(prev: DesignDocument | null, next: DesignDocument): DesignDiff {
  const ids = new Set<string>();
  for (const s of next.sites) {
    if (ids.has(s.id)) return { kind: 'reset', design: next };
    ids.add(s.id);
  }
  if (!prev) return { kind: 'reset', design: next };
  if (prev === next) return { kind: 'none' };
  if (!sameDevice(prev, next)) return { kind: 'reset', design: next };
  const changes: FarFieldChanges = {};
  let any = false;
  if (prev.sites !== next.sites) {
    const before = new Map<string, Site>();
    for (const s of prev.sites) before.set(s.id, s);
    const removed = prev.sites.filter((s) => !ids.has(s.id)).map((s) => s.id);
    const upserted: Site[] = [];
    const appended: string[] = [];
    for (const s of next.sites) {
      const old = before.get(s.id);
      if (!old) {
        upserted.push(s);
        appended.push(s.id);
      } else if (!sameSite(old, s)) upserted.push(s);
    }
    // the order the session arrives at: the old order without the removed sites, then the new ones
    const natural = prev.sites.filter((s) => ids.has(s.id)).map((s) => s.id).concat(appended);
    const reordered = natural.some((id, i) => next.sites[i].id !== id);
    if (removed.length) changes.removed = removed;
    if (upserted.length) changes.upserted = upserted;
    if (reordered) changes.order = next.sites.map((s) => s.id);
    any = removed.length > 0 || upserted.length > 0 || reordered;
  }
  if (prev.name !== next.name) {
    changes.name = next.name;
    any = true;
  }
  if (!sameHost(prev.host, next.host)) {
    changes.host = next.host;
    any = true;
  }
  if (!sameDomain(prev.domain, next.domain)) {
    changes.domain = next.domain;
    any = true;
  }
  if (!sameRefinement(prev.refinement, next.refinement)) {
    changes.refinement = next.refinement;
    any = true;
  }
  return any ? { kind: 'changes', changes } : { kind: 'none' };
}
