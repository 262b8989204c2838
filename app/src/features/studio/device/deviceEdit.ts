/**
 * Pure rules behind the host-stack and electrode forms (no React): the oxide preset, adding and
 * removing layers so the stack stays touching, the plane shortcut for electrodes, the form's text
 * values to document fields, and the contract's own messages for what an edit would break.
 *
 * Field names are the design document's (`host.layers`, `electrodes`, `domain.electrodeWalls`).
 */
import { designSchema, plainIssueMessage, type DesignDocument } from '@contracts/design';
import type { Electrode, Layer } from '../editorStore';

/**
 * Relative permittivities of the preset, handbook values at room temperature: silicon 11.7 and
 * thermal SiO₂ 3.9 (S. M. Sze and K. K. Ng, Physics of Semiconductor Devices, 3rd ed., Wiley 2007,
 * Appendix "Properties of Si" and "Properties of SiO₂ and Si₃N₄"; from memory, page not checked);
 * vacuum 1 by definition of εr.
 */
export const EPS_SILICON = 11.7;
export const EPS_OXIDE = 3.9;
export const EPS_VACUUM = 1;
/** The preset's oxide thickness (nm): a thin gate oxide of our own invented device (common practice). */
export const PRESET_OXIDE_NM = 5;
/** Depth of the topmost site under the silicon surface when the preset must move the surface up (common practice). */
export const PRESET_DEPTH_NM = 20;

/**
 * Where the preset puts the silicon surface: z = 0 when every site lies below it (the usual
 * picture: silicon below z = 0), else PRESET_DEPTH_NM above the topmost site, rounded up to a
 * whole nm, so that no site ends up on an interface or in the oxide.
 */
export function presetSurfaceNm(doc: DesignDocument): number {
  let top = -Infinity;
  for (const s of doc.sites) top = Math.max(top, s.position[2]);
  if (top < 0) return 0;
  return Math.ceil(top + PRESET_DEPTH_NM);
}

/** "Silicon under a thin oxide and vacuum": Si below the surface, SiO₂ for 5 nm, vacuum above. */
export function oxidePreset(surfaceNm: number): Layer[] {
  return [
    { name: 'silicon', epsilonR: EPS_SILICON, zMinNm: null, zMaxNm: surfaceNm },
    { name: 'oxide', epsilonR: EPS_OXIDE, zMinNm: surfaceNm, zMaxNm: surfaceNm + PRESET_OXIDE_NM },
    { name: 'vacuum', epsilonR: EPS_VACUUM, zMinNm: surfaceNm + PRESET_OXIDE_NM, zMaxNm: null },
  ];
}

function freeName(taken: readonly string[], stem: string): string {
  const set = new Set(taken);
  if (!set.has(stem)) return stem;
  for (let n = 2; ; n++) if (!set.has(`${stem} ${n}`)) return `${stem} ${n}`;
}

/**
 * A new layer on top: the current top layer (unbounded above) ends `thicknessNm` above its
 * bottom (or above the domain centre when it is unbounded both ways) and the new one takes over
 * from there, unbounded. The first layer of an empty stack fills all space with the host's εr.
 */
export function addLayerOnTop(layers: readonly Layer[], doc: DesignDocument, thicknessNm = 5): Layer[] {
  if (layers.length === 0) return [{ name: 'silicon', epsilonR: doc.host.epsilonR, zMinNm: null, zMaxNm: null }];
  const top = layers[layers.length - 1];
  const base = top.zMinNm ?? doc.domain.center[2] + doc.domain.halfExtentsNm[2] / 2;
  const cut = base + thicknessNm;
  return [...layers.slice(0, -1), { ...top, zMaxNm: cut }, { name: freeName(layers.map((l) => l.name), 'layer'), epsilonR: 1, zMinNm: cut, zMaxNm: null }];
}

/** Remove layer k; its neighbour below (or above, for the lowest) grows over its span, so the stack stays touching. */
export function removeLayer(layers: readonly Layer[], k: number): Layer[] {
  const out = layers.map((l) => ({ ...l }));
  const gone = out[k];
  out.splice(k, 1);
  if (out.length === 0) return out;
  if (k > 0) out[k - 1].zMaxNm = gone.zMaxNm;
  else out[0].zMinNm = gone.zMinNm;
  return out;
}

/**
 * Swap the materials (name and εr) of layers k and k + dir; the z bounds stay where they are,
 * so the stack stays touching and ordered. A material moves up or down the stack, not a slab.
 */
export function moveLayerMaterial(layers: readonly Layer[], k: number, dir: 1 | -1): Layer[] {
  const j = k + dir;
  if (j < 0 || j >= layers.length) return [...layers];
  const out = layers.map((l) => ({ ...l }));
  out[k] = { ...out[k], name: layers[j].name, epsilonR: layers[j].epsilonR };
  out[j] = { ...out[j], name: layers[k].name, epsilonR: layers[k].epsilonR };
  return out;
}

/** The domain box's corners (nm). */
export function domainCorners(doc: DesignDocument): { lo: [number, number, number]; hi: [number, number, number] } {
  const { center: c, halfExtentsNm: h } = doc.domain;
  return { lo: [c[0] - h[0], c[1] - h[1], c[2] - h[2]], hi: [c[0] + h[0], c[1] + h[1], c[2] + h[2]] };
}

/** The highest finite interface of the stack, or null. */
function topInterface(layers: readonly Layer[] | undefined): number | null {
  if (!layers) return null;
  for (let k = layers.length - 1; k >= 0; k--) {
    const z = layers[k].zMinNm;
    if (z !== null && k > 0) return z;
  }
  return null;
}

/** The default thickness of a plane shortcut's metal when nothing else fixes it (nm, common practice). */
export const PLANE_THICKNESS_NM = 1;

/**
 * A plane electrode: a metal box spanning the domain's whole x–y cross-section, which the layered
 * far field treats as a conducting half-space. The top plane sits on the highest interface of
 * the stack (a gate on the oxide) when that lies inside the domain, and reaches the domain's top;
 * without one it is the top PLANE_THICKNESS_NM of the domain. The back plane is the bottom
 * PLANE_THICKNESS_NM of the domain.
 */
export function planeElectrode(doc: DesignDocument, side: 'top' | 'back', taken: readonly string[]): Electrode {
  const { lo, hi } = domainCorners(doc);
  const face = topInterface(doc.host.layers);
  let z0: number, z1: number;
  if (side === 'top') {
    z1 = hi[2];
    z0 = face !== null && face > lo[2] && face < hi[2] ? face : hi[2] - PLANE_THICKNESS_NM;
  } else {
    z0 = lo[2];
    z1 = lo[2] + PLANE_THICKNESS_NM;
  }
  return { name: freeName(taken, side === 'top' ? 'top gate' : 'back gate'), minNm: [lo[0], lo[1], z0], maxNm: [hi[0], hi[1], z1], voltageV: 0 };
}

/** A small gate box above the middle of the sites (or the domain centre), to be edited: 10 nm × 10 nm × 2 nm. */
export function gateBox(doc: DesignDocument, taken: readonly string[]): Electrode {
  const face = topInterface(doc.host.layers);
  const c = doc.domain.center;
  let x = c[0], y = c[1], top = c[2] + doc.domain.halfExtentsNm[2] / 2;
  if (doc.sites.length > 0) {
    x = doc.sites.reduce((s, p) => s + p.position[0], 0) / doc.sites.length;
    y = doc.sites.reduce((s, p) => s + p.position[1], 0) / doc.sites.length;
    top = Math.max(...doc.sites.map((p) => p.position[2])) + 5;
  }
  const z0 = face ?? top;
  const r = (v: number) => Math.round(v * 100) / 100;
  return { name: freeName(taken, 'gate'), minNm: [r(x - 5), r(y - 5), r(z0)], maxNm: [r(x + 5), r(y + 5), r(z0 + 2)], voltageV: 0 };
}

/** Does this electrode span the domain's x–y cross-section (a plane for the layered far field)? */
export function spansCrossSection(e: Electrode, doc: DesignDocument): boolean {
  const { lo, hi } = domainCorners(doc);
  return e.minNm[0] <= lo[0] && e.minNm[1] <= lo[1] && e.maxNm[0] >= hi[0] && e.maxNm[1] >= hi[1];
}

// ---------------------------------------------------------------- form text ↔ fields

export interface LayerText {
  name: string;
  epsilonR: string;
  zMinNm: string;
  zMaxNm: string;
}
export interface ElectrodeText {
  name: string;
  min: [string, string, string];
  max: [string, string, string];
  voltageV: string;
}

const num = (s: string) => (s.trim() === '' ? NaN : Number(s.trim().replace('−', '-')));
/** An empty bound is unbounded (null); the contract says where that is allowed. */
const bound = (s: string) => (s.trim() === '' ? null : num(s));
const text = (v: number | null) => (v === null ? '' : String(v));

export const layerToText = (l: Layer): LayerText => ({ name: l.name, epsilonR: String(l.epsilonR), zMinNm: text(l.zMinNm), zMaxNm: text(l.zMaxNm) });
export const textToLayer = (t: LayerText): Layer => ({ name: t.name.trim(), epsilonR: num(t.epsilonR), zMinNm: bound(t.zMinNm), zMaxNm: bound(t.zMaxNm) });
export const electrodeToText = (e: Electrode): ElectrodeText => ({
  name: e.name,
  min: [String(e.minNm[0]), String(e.minNm[1]), String(e.minNm[2])],
  max: [String(e.maxNm[0]), String(e.maxNm[1]), String(e.maxNm[2])],
  voltageV: String(e.voltageV),
});
export const textToElectrode = (t: ElectrodeText): Electrode => ({
  name: t.name.trim(),
  minNm: [num(t.min[0]), num(t.min[1]), num(t.min[2])],
  maxNm: [num(t.max[0]), num(t.max[1]), num(t.max[2])],
  voltageV: num(t.voltageV),
});

// ---------------------------------------------------------------- the contract's messages

/** Messages per field ("host.layers.1.zMinNm" → text) and the messages about sites an edit causes. */
export interface EditIssues {
  fields: Record<string, string>;
  /** issues elsewhere in the document that this edit brings in (a site on an interface, inside metal) */
  other: string[];
  ok: boolean;
}

function issuesOf(doc: DesignDocument): { path: (string | number)[]; message: string }[] {
  const r = designSchema.safeParse(doc, { error: plainIssueMessage });
  if (r.success) return [];
  return r.error.issues.map((i) => ({ path: i.path.map((p) => (typeof p === 'symbol' ? String(p) : p)), message: i.message }));
}

/**
 * Check `next` (the document with the edited part) with the design contract and keep what the
 * edit is responsible for: every issue under `part` (its field messages), and issues elsewhere
 * that `before` did not have (a site that is now on an interface or inside an electrode).
 */
export function checkEdit(before: DesignDocument, next: DesignDocument, part: 'layers' | 'electrodes'): EditIssues {
  const prefix = part === 'layers' ? ['host', 'layers'] : ['electrodes'];
  const old = new Set(issuesOf(before).map((i) => `${i.path.join('.')}\u0000${i.message}`));
  const fields: Record<string, string> = {};
  const other: string[] = [];
  for (const i of issuesOf(next)) {
    const mine = prefix.every((p, k) => i.path[k] === p);
    if (mine) {
      const key = i.path.join('.');
      fields[key] ??= i.message;
    } else if (!old.has(`${i.path.join('.')}\u0000${i.message}`)) {
      const site = i.path[0] === 'sites' && typeof i.path[1] === 'number' ? next.sites[i.path[1]]?.id : undefined;
      other.push(site !== undefined ? `Site ${site} ${i.message}.` : `${i.path.join('.')} ${i.message}.`);
    }
  }
  return { fields, other, ok: Object.keys(fields).length === 0 && other.length === 0 };
}

/** The document with new layers (none: `host.layers` removed). */
export function withLayers(doc: DesignDocument, layers: readonly Layer[]): DesignDocument {
  const { layers: _old, ...rest } = doc.host;
  void _old;
  return { ...doc, host: layers.length === 0 ? rest : { ...rest, layers: [...layers] } };
}

/** The document with new electrodes (none: `electrodes` removed). */
export function withElectrodes(doc: DesignDocument, electrodes: readonly Electrode[]): DesignDocument {
  const { electrodes: _old, ...rest } = doc;
  void _old;
  return electrodes.length === 0 ? rest : { ...rest, electrodes: [...electrodes] };
}
