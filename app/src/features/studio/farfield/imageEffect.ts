/**
 * The image-charge figure of the live check (issue 11): how much the host's interfaces and the
 * metal planes change U and V against an infinite host of the design's εr. The far-field report
 * carries it as `imageEffect` (absent without layers and electrodes; shape agreed for `check
 * --json` and geometry/farfield's FarFieldReport); this file reads it and words it, no physics.
 */
import type { DesignDocument } from '@contracts/design';
import type { FarFieldReport } from '../../../../../geometry/farfield';
import { percent } from './figures';

/** A site named by id, or by its index in the design's site list. */
type SiteRef = string | number;

export interface ImageEffectFigure {
  /** worst ΔU/U and ΔV/V (fractions, signed), null when none applies */
  worstURel: number | null;
  worstUSite: SiteRef | null;
  worstVRel: number | null;
  worstVPair: [SiteRef, SiteRef] | null;
  /** truncation bound of the image series (eV) */
  tailBoundEv: number;
  /** largest share of a density across an interface (fraction) */
  maxLeak: number;
  findings: { code: string; index?: number; value?: number }[];
}

/** The report's image-charge figure, if it carries one. */
export function imageEffectOf(report: FarFieldReport | null): ImageEffectFigure | null {
  const r = report as (FarFieldReport & { imageEffect?: ImageEffectFigure }) | null;
  return r?.imageEffect ?? null;
}

/** A site's id for display (an index is looked up in the design). */
export function siteName(ref: SiteRef, doc: DesignDocument): string {
  if (typeof ref === 'number') return doc.sites[ref]?.id ?? `#${ref}`;
  return ref;
}

/** A signed fraction as a percentage: 0.123 → "+12.3 %", −0.004 → "−0.400 %" (no-break space before %). */
export function signedPercent(x: number | null): string {
  if (x === null || !Number.isFinite(x)) return '—';
  const t = (100 * Math.abs(x)).toPrecision(3);
  return `${x > 0 ? '+' : x < 0 ? '−' : ''}${t}\u00a0%`;
}

const layerName = (doc: DesignDocument, k: number | undefined) => (k !== undefined && doc.host.layers?.[k] ? `“${doc.host.layers[k].name}”` : 'a layer');
const electrodeName = (doc: DesignDocument, k: number | undefined) => (k !== undefined && doc.electrodes?.[k] ? `“${doc.electrodes[k].name}”` : 'an electrode');

/** Words for the layered host's finding codes (geometry/host HostCode); unknown codes are named as they are. */
export function findingText(f: { code: string; index?: number; value?: number }, doc: DesignDocument): string {
  const v = f.value;
  switch (f.code) {
    case 'electrode-outside-domain':
      return `Electrode ${electrodeName(doc, f.index)} lies wholly outside the domain box: clipped to nothing, it takes no part in any figure.`;
    case 'electrode-clipped':
      return `Electrode ${electrodeName(doc, f.index)} reaches outside the domain box and is clipped to it${v !== undefined ? ` (${percent(v)} of its volume kept)` : ''}.`;
    case 'site-near-electrode':
      return `Site ${f.index !== undefined ? siteName(f.index, doc) : '?'} is ${v !== undefined ? `${v.toPrecision(3)} nm` : 'within a few orbital sizes'} from an electrode: an ideal metal face and a fixed density are least reliable this close.`;
    case 'electrode-not-plane':
      return `Electrode ${electrodeName(doc, f.index)} does not span the domain’s x–y cross-section: its images need the finite-element solve and are not in these figures.`;
    case 'electrode-straddles':
      return `Electrode ${electrodeName(doc, f.index)} spans the cross-section with sites on both sides of it: it cannot be taken as one metal plane.`;
    case 'too-many-interfaces':
      return `More than two interfaces lie between the nearest metals${v !== undefined ? ` (${v})` : ''}: no closed form here, so the image-charge figures are left out.`;
    case 'density-leaks':
      return `A site’s density reaches across an interface${v !== undefined ? ` (${percent(v)} of it)` : ''}: the image figures treat it as a point there and are rougher.`;
    case 'series-capped':
      return `The image series stopped at its term limit${v !== undefined ? `; its tail is bounded by ${(v * 1000).toPrecision(2)} meV` : ''}.`;
    case 'point-image':
      return 'Some pairs have no closed-form interaction: their image part uses point charges.';
    case 'pairs-not-given':
      return 'Too many sites to pair all of them: some pairs have no image figure.';
    case 'on-interface':
      return `A site lies on an interface${v !== undefined ? ` (z = ${v} nm)` : ''}: move it into one layer.`;
    case 'in-metal':
      return 'A site lies inside metal.';
    case 'no-domain':
      return 'Electrodes need the domain box to be recognised as planes.';
    case 'bounded-end':
      return `The ${f.index === 0 ? 'lowest' : 'highest'} layer ${layerName(doc, f.index)} has a bound at the stack’s end; it is taken as unbounded.`;
    case 'layer-order':
    case 'layer-empty':
    case 'layer-epsilon':
    case 'inner-unbounded':
      return `Layer ${layerName(doc, f.index)} does not fit the stack rules (${f.code}).`;
    case 'not-between-plates':
      return 'Closed-form lever arms need metal on both sides of the sites.';
    default:
      return `${f.code}${f.index !== undefined ? ` (item ${f.index})` : ''}${v !== undefined ? `: ${v}` : ''}`;
  }
}

/** One sentence on what the worst figures mean for this design (against its target error). */
export function imageEffectMeaning(e: ImageEffectFigure, target: number): string {
  const worst = Math.max(Math.abs(e.worstURel ?? 0), Math.abs(e.worstVRel ?? 0));
  if (e.worstURel === null && e.worstVRel === null) return 'No site or pair has a closed-form image figure here; the finite-element solve will include the stack.';
  const direction = 'a lower-εr medium nearby (oxide, vacuum) raises U and V through like-signed images, metal lowers them through opposite ones';
  return worst > target
    ? `The stack matters here: it changes U or V by more than the design’s target error, so compare with an infinite host only with care (${direction}).`
    : `The stack changes U and V by less than the design’s target error at these depths (${direction}).`;
}
