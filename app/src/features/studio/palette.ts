/**
 * Tetrawell's own look for the design canvas: a light ground that sits in the light app frame, and
 * a species palette of our own choosing, with a second cue besides colour (each species has its
 * own sphere size: the acceptor smallest, heavier donors larger; the legend names them; a selected
 * site is drawn larger as well as darker).
 *
 * The species colours were picked to stay apart for people with protan, deutan and tritan colour
 * vision as well as typical vision, and to stand out from the ground; `tests/app/palette.test.ts`
 * checks both with the CIEDE2000 colour difference under the Machado–Oliveira–Fernandes (2009)
 * dichromacy simulation, and the WCAG 2 contrast of every label on the canvas. They are not the
 * element colours of molecular viewers (that test checks this too).
 */
import type { Species } from '../../../../geometry/design/types';

export interface SpeciesStyle {
  css: string;
  /** sphere radius on the canvas, in lattice constants (a display size, not a physical radius) */
  radiusA: number;
  label: string;
}

export const SPECIES_ORDER: readonly Species[] = ['P', 'As', 'Sb', 'Bi', 'B'];

export const SPECIES_STYLE: Record<Species, SpeciesStyle> = {
  P: { css: '#233989', radiusA: 0.5, label: 'P donor' }, // deep navy
  As: { css: '#918d00', radiusA: 0.6, label: 'As donor' }, // olive gold
  Sb: { css: '#008663', radiusA: 0.7, label: 'Sb donor' }, // sea green
  Bi: { css: '#663e00', radiusA: 0.8, label: 'Bi donor' }, // umber
  B: { css: '#897ced', radiusA: 0.38, label: 'B acceptor' }, // periwinkle
};

/** a selected site: near-black, and drawn SELECTED_SCALE times larger */
export const SELECTED_CSS = '#1b1a17';
export const SELECTED_SCALE = 1.3;
/** far-field warnings on the canvas (rings round sites, tinted box faces); the app's garnet */
export const WARNING_CSS = '#b9354a';

/** The canvas' own colours: its ground, the domain box, bonds and the labels drawn over it. */
export const CANVAS_THEME = {
  /** the 3D ground (the app's wafer-50, a shade off the page's paper so the view reads as a pane) */
  ground: '#f3f2ee',
  /** domain-box edges; the face handles in the app's accent, so they read as things to grab, not as sites */
  boxEdge: '#4e4b44',
  boxFill: '#8e897e',
  handle: '#0d7a6e',
  bond: '#8e897e',
  /** the active layer and its snap dots (the app's accent) */
  layer: '#1fb3a3',
  snapDot: '#0d7a6e',
  /** labels over the canvas (scale bar, axes, legend, view buttons): ink on a near-opaque panel */
  labelInk: '#292823',
  labelMuted: '#4e4b44',
  labelPanel: '#ffffff',
  /** how opaque the label panels are over the ground (contrast is checked against the mix) */
  labelPanelAlpha: 0.92,
  /**
   * Host layers: translucent slabs outlined in `layerEdge`, tinted by their place from the bottom
   * up (layerTintOf): amber, plum, sky blue, olive grey, then round again. A stack of up to four
   * layers (silicon, oxide, vacuum; or with a second dielectric) has a tint per layer, and
   * neighbours always differ, also for colour-vision deficiencies; each slab's label repeats its
   * tint beside its name, the second cue. Picked by search for the CIEDE2000 margins that
   * tests/app/palette.test.ts checks at this opacity (the slabs' figure: opacity 0.25 leaves sites
   * behind a slab clearly visible).
   */
  layerTints: ['#e0a030', '#390037', '#0a8dfc', '#454137'],
  layerOpacity: 0.25,
  layerEdge: '#5e5540',
  /** metal electrodes: solid dark brass boxes (a box, not a sphere: the shape is the second cue), edges darker */
  electrode: '#7c662e',
  electrodeEdge: '#3b3016',
} as const;

/** The tint of the layer at `index` (0 = bottom) in a stack: its place, round the four tints. */
export function layerTintOf(index: number): string {
  const t = CANVAS_THEME.layerTints;
  return t[((index % t.length) + t.length) % t.length];
}
