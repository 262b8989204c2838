/**
 * Building and reading a planar stack: the layers of issue 11 (bottom to top, contiguous),
 * optionally closed by metal planes, become flat arrays of interfaces and permittivities.
 *
 *     z ↑      vacuum   εr = 1          (zMaxNm = null: unbounded)
 *       ──────────────────────── 5 nm
 *              SiO₂     εr = 3.9
 *       ──────────────────────── 0 nm
 *              Si       εr = 11.7       (zMinNm = null: unbounded)
 *
 * A metal plane (an electrode spanning the domain's cross-section) replaces everything beyond its
 * face by a region of εr = ∞ (a conducting half-space, Jackson §2.1).
 */
import type { HostFinding, HostLayer, PlanarStack } from './types';

/** Points closer than this to an interface count as on it (nm; common practice, far below a lattice constant). */
export const ON_INTERFACE_NM = 1e-9;

/** A conducting half-space: metal fills z > zNm (`side: 'above'`) or z < zNm (`side: 'below'`). */
export interface MetalPlane {
  name: string;
  side: 'above' | 'below';
  zNm: number;
}

interface Region {
  lo: number;
  hi: number;
  eps: number;
  name: string;
}

/**
 * Checks the layers and builds the stack. Findings with codes `no-layers`, `layer-order`,
 * `layer-empty`, `layer-epsilon` and `inner-unbounded` leave `stack` null; `bounded-end` is a note
 * (the end layer is taken as unbounded, which is what the examples mean).
 */
export function planarStack(layers: readonly HostLayer[], planes: readonly MetalPlane[] = []): { stack: PlanarStack | null; findings: HostFinding[] } {
  const findings: HostFinding[] = [];
  if (layers.length === 0) return { stack: null, findings: [{ code: 'no-layers' }] };
  const regions: Region[] = [];
  for (let k = 0; k < layers.length; k++) {
    const layer = layers[k];
    if (!(Number.isFinite(layer.epsilonR) && layer.epsilonR > 0)) findings.push({ code: 'layer-epsilon', index: k });
    const first = k === 0;
    const last = k === layers.length - 1;
    if (layer.zMinNm === null && !first) findings.push({ code: 'inner-unbounded', index: k });
    if (layer.zMaxNm === null && !last) findings.push({ code: 'inner-unbounded', index: k });
    if (first && layer.zMinNm !== null) findings.push({ code: 'bounded-end', index: k, value: layer.zMinNm });
    if (last && layer.zMaxNm !== null) findings.push({ code: 'bounded-end', index: k, value: layer.zMaxNm });
    const lo = first ? -Infinity : (layer.zMinNm ?? -Infinity);
    const hi = last ? Infinity : (layer.zMaxNm ?? Infinity);
    if (layer.zMinNm !== null && layer.zMaxNm !== null && !(layer.zMaxNm > layer.zMinNm)) findings.push({ code: 'layer-empty', index: k });
    if (!first && layers[k - 1].zMaxNm !== layer.zMinNm) findings.push({ code: 'layer-order', index: k });
    regions.push({ lo, hi, eps: layer.epsilonR, name: layer.name });
  }
  if (findings.some((f) => f.code !== 'bounded-end')) return { stack: null, findings };
  let cut = regions;
  for (const plane of planes) cut = applyPlane(cut, plane);
  return { stack: fromRegions(cut), findings };
}

/** A homogeneous host of relative permittivity `epsilonR` (no interface). */
export function homogeneousStack(epsilonR: number, name = 'host'): PlanarStack {
  return { interfaces: new Float64Array(0), epsilon: Float64Array.of(epsilonR), names: [name] };
}

function applyPlane(regions: Region[], plane: MetalPlane): Region[] {
  const out: Region[] = [];
  const z = plane.zNm;
  if (plane.side === 'above') {
    for (const r of regions) if (r.lo < z) out.push({ ...r, hi: Math.min(r.hi, z) });
    out.push({ lo: z, hi: Infinity, eps: Infinity, name: plane.name });
  } else {
    out.push({ lo: -Infinity, hi: z, eps: Infinity, name: plane.name });
    for (const r of regions) if (r.hi > z) out.push({ ...r, lo: Math.max(r.lo, z) });
  }
  return out;
}

/** Regions → flat arrays, merging neighbours of equal εr (their interface carries no image). */
function fromRegions(regions: Region[]): PlanarStack {
  const merged: Region[] = [];
  for (const r of regions) {
    const prev = merged[merged.length - 1];
    if (prev && prev.eps === r.eps) prev.hi = r.hi;
    else merged.push({ ...r });
  }
  const interfaces = new Float64Array(merged.length - 1);
  const epsilon = new Float64Array(merged.length);
  for (let k = 0; k < merged.length; k++) {
    epsilon[k] = merged[k].eps;
    if (k > 0) interfaces[k - 1] = merged[k].lo;
  }
  return { interfaces, epsilon, names: merged.map((r) => r.name) };
}

/** Index of the region holding z, or −1 when z lies within ON_INTERFACE_NM of an interface. */
export function regionOf(stack: PlanarStack, z: number): number {
  const iface = stack.interfaces;
  let k = 0;
  while (k < iface.length && z > iface[k]) k++;
  if (k < iface.length && Math.abs(z - iface[k]) <= ON_INTERFACE_NM) return -1;
  if (k > 0 && Math.abs(z - iface[k - 1]) <= ON_INTERFACE_NM) return -1;
  return k;
}

/**
 * The part of the stack a charge in region `source` sees: a metal region screens everything
 * beyond it (the potential there is the metal's own, here 0), so the stack is cut at the nearest
 * metal below and above. Returns the cut stack and the source's index in it.
 */
export function screenedStack(stack: PlanarStack, source: number): { stack: PlanarStack; source: number; offset: number } {
  let lo = source;
  while (lo > 0 && Number.isFinite(stack.epsilon[lo])) lo--;
  let hi = source;
  while (hi < stack.epsilon.length - 1 && Number.isFinite(stack.epsilon[hi])) hi++;
  return {
    stack: {
      interfaces: stack.interfaces.slice(lo, hi),
      epsilon: stack.epsilon.slice(lo, hi + 1),
      names: stack.names.slice(lo, hi + 1),
    },
    source: source - lo,
    offset: lo,
  };
}
