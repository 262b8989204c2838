/**
 * Tetrawell's own species palette for the canvas, the legend and the table, with a second cue
 * besides colour: each species is drawn at its own sphere size (acceptor smallest, heavier donors
 * larger), and the legend names it. Colours chosen to stay apart for the common colour-vision
 * deficiencies (blue/orange/purple axes rather than red/green); common practice, no outside source.
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
  P: { css: '#1fb3a3', radiusA: 0.5, label: 'P donor' },
  As: { css: '#7b5cd6', radiusA: 0.6, label: 'As donor' },
  Sb: { css: '#e08a1e', radiusA: 0.7, label: 'Sb donor' },
  Bi: { css: '#2f6fd0', radiusA: 0.8, label: 'Bi donor' },
  B: { css: '#d6d6d6', radiusA: 0.38, label: 'B acceptor' },
};

export const SELECTED_CSS = '#f6c97a';
export const WARNING_CSS = '#b9354a';
