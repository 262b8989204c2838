/**
 * Words for `check` on a layered host or with electrodes (issue 11): the image-charge effect, the
 * findings of geometry/farfield/layered.ts (codes and figures only) and the kind of each bound.
 * The core gives codes; the words live here, beside the rest of check's text.
 */
import type { Design } from '../../geometry/design/types';
import type { FarFieldReport } from '../../geometry/farfield';
import type { BoundReason, ImageFinding } from '../../geometry/farfield/layered';
import { BOUND_REASON_WORDS } from '@contracts/farfieldWords';

const pct = (x: number | null | undefined) => (x === null || x === undefined || !Number.isFinite(x) ? '—' : `${(100 * x).toPrecision(3)}%`);
const nm = (x: number | undefined) => (x === undefined || !Number.isFinite(x) ? '?' : `${x.toPrecision(3)} nm`);

/** Findings of one code listed in words before the rest are counted (common practice). */
export const FINDINGS_PER_CODE = 8;

function layerName(design: Design, k: number | undefined): string {
  const l = k === undefined ? undefined : design.host.layers?.[k];
  return l ? `layer "${l.name}"` : `layer ${k ?? '?'}`;
}

function electrodeName(design: Design, k: number | undefined): string {
  const e = k === undefined ? undefined : design.electrodes?.[k];
  return e ? `electrode "${e.name}"` : `electrode ${k ?? '?'}`;
}

function siteName(design: Design, k: number | undefined): string {
  const s = k === undefined ? undefined : design.sites[k];
  return s ? `site ${s.id}` : `site ${k ?? '?'}`;
}

/** One finding in words. */
export function findingWords(design: Design, f: ImageFinding): string {
  switch (f.code) {
    case 'electrode-outside-domain':
      return `${electrodeName(design, f.index)} lies wholly outside the domain box: clipped to nothing, it takes no part in any figure. Move it or enlarge the box.`;
    case 'electrode-clipped':
      return `${electrodeName(design, f.index)} reaches outside the domain box and is clipped to it (${pct(f.value)} of its volume is kept).`;
    case 'electrode-not-plane':
      return `${electrodeName(design, f.index)} does not span the domain's x–y cross-section, so it is not a metal plane: its images are not in the image-charge figures (a finite-element solve includes it).`;
    case 'electrode-straddles':
      return `${electrodeName(design, f.index)} spans the cross-section but has sites on both sides, so it is not treated as a metal plane; its images are not in the figures.`;
    case 'site-near-electrode':
      return `${siteName(design, f.index)} is ${nm(f.value)} from an electrode, within a few orbital sizes: its density reaches close to the metal, where an ideal metal face and a fixed density are least reliable.`;
    case 'density-leaks':
      return `${pct(f.value)} of the density of ${siteName(design, f.index)} lies across an interface: its image figures are an approximation of that size.`;
    case 'too-many-interfaces':
      return `${siteName(design, f.index)} has more than two interfaces between the nearest metals: no closed form here, its image-charge figures are missing.`;
    case 'series-capped':
      return `the image series of ${siteName(design, f.index)} stopped at its term cap; its truncation bound is ${f.value?.toPrecision(3) ?? '?'} nm⁻¹.`;
    case 'point-image':
      return `pairs of ${siteName(design, f.index)} without a closed-form interaction use the point-charge 1/R for their images.`;
    case 'on-interface':
      return `${siteName(design, f.index)} sits on an interface: no image figures.`;
    case 'in-metal':
      return `${siteName(design, f.index)} sits inside metal: no image figures.`;
    case 'no-domain':
      return 'electrodes were given without a domain box, so no metal plane can be recognised.';
    case 'layer-order':
      return `${layerName(design, f.index)} does not start where the layer below ends.`;
    case 'layer-empty':
      return `${layerName(design, f.index)} has no thickness.`;
    case 'layer-epsilon':
      return `${layerName(design, f.index)} needs a finite positive εr.`;
    case 'inner-unbounded':
      return `${layerName(design, f.index)} is unbounded although it is not an end layer.`;
    case 'bounded-end':
      return `${layerName(design, f.index)} is the end of the stack and is taken as unbounded (its bound at ${nm(f.value)} is ignored).`;
    case 'no-layers':
      return 'the stack has no layers.';
    case 'not-between-plates':
      return 'the stack is not a dielectric between two metal planes.';
    case 'pairs-not-given':
      return 'too many sites for all pairs.';
  }
}

/** Severity of a finding for the readable list: a warning where the design probably holds a mistake. */
export function findingSeverity(f: ImageFinding): 'warning' | 'info' {
  return f.code === 'electrode-outside-domain' || f.code === 'electrode-clipped' || f.code === 'electrode-straddles' || f.code === 'site-near-electrode' || f.code === 'density-leaks' || f.code === 'too-many-interfaces' ? 'warning' : 'info';
}

/**
 * The stack and electrodes as check reads them, then the image-charge effect and the kind of the
 * bounds (`reasons`: each site's boundReason, in site order; the report's columns hold them).
 */
export function layeredSection(design: Design, r: Pick<FarFieldReport, 'imageEffect'>, reasons: readonly (BoundReason | undefined)[]): string[] {
  const out: string[] = [];
  const layers = design.host.layers ?? [];
  const electrodes = design.electrodes ?? [];
  const e = r.imageEffect;
  if (!e) return out;
  out.push('');
  out.push('Layers and electrodes:');
  if (layers.length)
    out.push(
      `  stack (bottom to top): ${layers.map((l) => `${l.name} εr = ${l.epsilonR} (${l.zMinNm === null ? '−∞' : l.zMinNm} to ${l.zMaxNm === null ? '+∞' : l.zMaxNm} nm)`).join('; ')}`,
    );
  else out.push(`  no layers: a homogeneous host of εr = ${design.host.epsilonR}`);
  for (const el of electrodes)
    out.push(`  electrode "${el.name}" at ${el.voltageV} V: [${el.minNm.join(', ')}] to [${el.maxNm.join(', ')}] nm`);
  out.push('');
  out.push(`Image-charge effect against an infinite silicon host (εr = ${design.host.epsilonR}, no interfaces, no electrodes):`);
  out.push(`  worst change of U: ${pct(e.worstURel)}${e.worstUSite === null ? ' (no site has a closed form)' : ` (site ${e.worstUSite})`}`);
  out.push(`  worst change of V: ${pct(e.worstVRel)}${e.worstVPair === null ? ' (no pair has a closed form)' : ` (pair ${e.worstVPair[0]}–${e.worstVPair[1]})`}`);
  out.push(`  image series truncated at most by ${(1000 * e.tailBoundEv).toPrecision(2)} meV; largest share of a density across an interface ${pct(e.maxLeak)}`);
  if (electrodes.length && e.findings.some((f) => f.code === 'electrode-not-plane'))
    out.push('  Electrodes that are not planes (gates and leads of finite size) are left out of this closed form; only a finite-element solve includes them.');
  const counts = new Map<string, number>();
  for (const reason of reasons) if (reason) counts.set(reason, (counts.get(reason) ?? 0) + 1);
  if (counts.size) {
    out.push('');
    out.push('Boundary bounds in this stack:');
    for (const [reason, n] of counts) out.push(`  ${n} site(s): ${BOUND_REASON_WORDS[reason as BoundReason]}`);
  }
  if (e.findings.length) {
    out.push('');
    out.push('findings for layers and electrodes:');
    // at most FINDINGS_PER_CODE of one code (a large array can have one per site); --json has all
    const shown = new Map<string, number>();
    for (const f of e.findings) {
      const k = shown.get(f.code) ?? 0;
      shown.set(f.code, k + 1);
      if (k < FINDINGS_PER_CODE) out.push(`  [${findingSeverity(f)}] ${f.code}: ${findingWords(design, f)}`);
    }
    for (const [code, k] of shown) if (k > FINDINGS_PER_CODE) out.push(`  … and ${k - FINDINGS_PER_CODE} more ${code} findings (use --json for all)`);
  }
  return out;
}
