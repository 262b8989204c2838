/**
 * The far-field report in columns for the trip from the worker: numbers in typed arrays (moved,
 * not copied), pairs as indices into the site ids. A 10,000-site report holds some 40,000 small
 * objects, and copying them one by one (structured clone) took longer than computing the update;
 * unpacking rebuilds the same objects on the page, bit for bit (null kept in a flag byte, never
 * coded as a number). A layered host's bound kind and reason (issue 11) ride in one code byte per
 * site, and a site without them gets none back.
 */
import type { FarFieldReport, PairBound, SiteBound } from '../../../../../geometry/farfield';
import { BOUND_REASON_CODES, type BoundKindCode } from '@contracts/farfieldWords';

export interface PackedReport {
  head: Omit<FarFieldReport, 'sites' | 'pairs'>;
  ids: string[];
  /** per site: chargeOutside, uBoundEv, uRelBound, uEv, clearanceNm, requiredClearanceNm */
  siteNum: Float64Array;
  /** per site: 1 = uBoundEv null, 2 = uRelBound null */
  siteNull: Uint8Array;
  /**
   * per site: bits 0–1 the bound kind (0 absent, 1 rigorous, 2 estimated), bits 2–4 the bound
   * reason (0 absent, else 1 + its place in BOUND_REASON_CODES)
   */
  siteBound: Uint8Array;
  /** per pair: index of a, index of b in ids */
  pairIdx: Int32Array;
  /** per pair: distanceNm, vEv, vBoundEv, vRelBound */
  pairNum: Float64Array;
  /** per pair: 1 = point-charge V, 2 = vBoundEv null, 4 = vRelBound null */
  pairFlags: Uint8Array;
}

const KINDS: readonly BoundKindCode[] = ['rigorous', 'estimated'];

function boundCode(s: SiteBound): number {
  const kind = s.boundKind === undefined ? 0 : KINDS.indexOf(s.boundKind) + 1;
  const reason = s.boundReason === undefined ? 0 : BOUND_REASON_CODES.indexOf(s.boundReason) + 1;
  // a code the app does not know would come back as another one: refuse it (a stale app and core)
  if (kind === 0 && s.boundKind !== undefined) throw new Error(`unknown bound kind ${String(s.boundKind)}`);
  if (reason === 0 && s.boundReason !== undefined) throw new Error(`unknown bound reason ${String(s.boundReason)}`);
  return kind | (reason << 2);
}

export function packReport(r: FarFieldReport): PackedReport {
  const { sites, pairs, ...head } = r;
  const n = sites.length, m = pairs.length;
  const ids = new Array<string>(n);
  const at = new Map<string, number>();
  const siteNum = new Float64Array(6 * n);
  const siteNull = new Uint8Array(n);
  const siteBound = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const s = sites[i];
    ids[i] = s.id;
    at.set(s.id, i);
    siteNum[6 * i] = s.chargeOutside;
    siteNum[6 * i + 1] = s.uBoundEv ?? 0;
    siteNum[6 * i + 2] = s.uRelBound ?? 0;
    siteNum[6 * i + 3] = s.uEv;
    siteNum[6 * i + 4] = s.clearanceNm;
    siteNum[6 * i + 5] = s.requiredClearanceNm;
    siteNull[i] = (s.uBoundEv === null ? 1 : 0) | (s.uRelBound === null ? 2 : 0);
    siteBound[i] = boundCode(s);
  }
  const pairIdx = new Int32Array(2 * m);
  const pairNum = new Float64Array(4 * m);
  const pairFlags = new Uint8Array(m);
  for (let t = 0; t < m; t++) {
    const p = pairs[t];
    pairIdx[2 * t] = at.get(p.a) ?? -1;
    pairIdx[2 * t + 1] = at.get(p.b) ?? -1;
    pairNum[4 * t] = p.distanceNm;
    pairNum[4 * t + 1] = p.vEv;
    pairNum[4 * t + 2] = p.vBoundEv ?? 0;
    pairNum[4 * t + 3] = p.vRelBound ?? 0;
    pairFlags[t] = (p.vModel === 'point-charge' ? 1 : 0) | (p.vBoundEv === null ? 2 : 0) | (p.vRelBound === null ? 4 : 0);
  }
  return { head, ids, siteNum, siteNull, siteBound, pairIdx, pairNum, pairFlags };
}

/** The buffers to move rather than copy (comlink's transfer()). */
export function packedBuffers(p: PackedReport): ArrayBuffer[] {
  return [p.siteNum.buffer, p.siteNull.buffer, p.siteBound.buffer, p.pairIdx.buffer, p.pairNum.buffer, p.pairFlags.buffer] as ArrayBuffer[];
}

export function unpackReport(p: PackedReport): FarFieldReport {
  const n = p.ids.length, m = p.pairFlags.length;
  const sites = new Array<SiteBound>(n);
  for (let i = 0; i < n; i++) {
    const f = p.siteNull[i];
    sites[i] = {
      id: p.ids[i],
      chargeOutside: p.siteNum[6 * i],
      uBoundEv: f & 1 ? null : p.siteNum[6 * i + 1],
      uRelBound: f & 2 ? null : p.siteNum[6 * i + 2],
      uEv: p.siteNum[6 * i + 3],
      clearanceNm: p.siteNum[6 * i + 4],
      requiredClearanceNm: p.siteNum[6 * i + 5],
    };
    const b = p.siteBound[i];
    if (b & 3) sites[i].boundKind = KINDS[(b & 3) - 1];
    if (b >> 2) sites[i].boundReason = BOUND_REASON_CODES[(b >> 2) - 1];
  }
  const pairs = new Array<PairBound>(m);
  for (let t = 0; t < m; t++) {
    const f = p.pairFlags[t];
    pairs[t] = {
      a: p.ids[p.pairIdx[2 * t]],
      b: p.ids[p.pairIdx[2 * t + 1]],
      distanceNm: p.pairNum[4 * t],
      vEv: p.pairNum[4 * t + 1],
      vModel: f & 1 ? 'point-charge' : 'closed-form',
      vBoundEv: f & 2 ? null : p.pairNum[4 * t + 2],
      vRelBound: f & 4 ? null : p.pairNum[4 * t + 3],
    };
  }
  return { ...p.head, sites, pairs };
}
