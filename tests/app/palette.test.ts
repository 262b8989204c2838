/**
 * The canvas palette and labels (app/src/features/studio/palette.ts), checked with culori, a
 * general-purpose colour library:
 * - colour difference: CIEDE2000 (Sharma, Wu & Dalal, "The CIEDE2000 color-difference formula",
 *   Color Res. Appl. 30, 2005), culori's differenceCiede2000;
 * - colour-vision deficiency: the Machado, Oliveira & Fernandes (2009) simulation of protanopia,
 *   deuteranopia and tritanopia at full severity ("A physiologically-based model for simulation of
 *   color vision deficiency", IEEE TVCG 15), culori's filterDeficiency*;
 * - contrast: WCAG 2 contrast ratio (W3C WCAG 2.1, relative luminance), culori's wcagContrast;
 *   text needs 4.5:1 (SC 1.4.3), graphical objects 3:1 (SC 1.4.11).
 * The thresholds on ΔE00 (20 between species, 25 from the ground) are common practice: ΔE00 ≈ 10
 * is already an obvious difference side by side, and the canvas shows shaded spheres, not swatches.
 */
import { describe, expect, it } from 'vitest';
import { differenceCiede2000, filterDeficiencyDeuter, filterDeficiencyProt, filterDeficiencyTrit, formatHex, parse, wcagContrast, type Color } from 'culori';
import { CANVAS_THEME, SELECTED_CSS, SELECTED_SCALE, SPECIES_ORDER, SPECIES_STYLE, WARNING_CSS, layerTintOf } from '../../app/src/features/studio/palette';
import { oxidePreset } from '../../app/src/features/studio/device/deviceEdit';

const de = differenceCiede2000();
const colour = (css: string): Color => parse(css)!;
const protan = filterDeficiencyProt(1), deutan = filterDeficiencyDeuter(1), tritan = filterDeficiencyTrit(1);
const vision: Record<string, (css: string) => Color> = {
  typical: colour,
  protan: (css) => protan(colour(css)),
  deutan: (css) => deutan(colour(css)),
  tritan: (css) => tritan(colour(css)),
};

/** what a panel of colour `top` at opacity `alpha` over `under` shows (sRGB source-over, as browsers blend) */
function over(top: string, alpha: number, under: string): string {
  const t = parse(top) as { r: number; g: number; b: number };
  const u = parse(under) as { r: number; g: number; b: number };
  return formatHex({ mode: 'rgb', r: alpha * t.r + (1 - alpha) * u.r, g: alpha * t.g + (1 - alpha) * u.g, b: alpha * t.b + (1 - alpha) * u.b });
}

const drawn = [...SPECIES_ORDER.map((sp) => [sp, SPECIES_STYLE[sp].css] as const), ['selected', SELECTED_CSS] as const];

describe('species palette', () => {
  it.each(Object.keys(vision))('keeps every species and the selection apart for %s colour vision', (who) => {
    const f = vision[who];
    for (let i = 0; i < drawn.length; i++)
      for (let j = i + 1; j < drawn.length; j++) {
        const d = de(f(drawn[i][1]), f(drawn[j][1]));
        expect(d, `${drawn[i][0]} vs ${drawn[j][0]}`).toBeGreaterThanOrEqual(20);
      }
  });

  it.each(Object.keys(vision))('sets every species off the ground for %s colour vision', (who) => {
    const f = vision[who];
    for (const [name, css] of drawn) expect(de(f(css), f(CANVAS_THEME.ground)), name).toBeGreaterThanOrEqual(25);
  });

  it('gives spheres, warnings and the box 3:1 contrast against the ground (WCAG 2.1 SC 1.4.11)', () => {
    for (const [name, css] of drawn) expect(wcagContrast(css, CANVAS_THEME.ground), name).toBeGreaterThanOrEqual(3);
    for (const css of [WARNING_CSS, CANVAS_THEME.boxEdge, CANVAS_THEME.handle, CANVAS_THEME.snapDot]) expect(wcagContrast(css, CANVAS_THEME.ground), css).toBeGreaterThanOrEqual(3);
  });

  it('has a second cue besides colour: a size per species, and a larger selected sphere', () => {
    const radii = SPECIES_ORDER.map((sp) => SPECIES_STYLE[sp].radiusA);
    expect(new Set(radii).size).toBe(radii.length);
    // neighbouring sizes differ by at least 10 % (common practice: smaller steps are hard to see)
    const sorted = [...radii].sort((p, q) => p - q);
    for (let k = 1; k < sorted.length; k++) expect(sorted[k] / sorted[k - 1]).toBeGreaterThanOrEqual(1.1);
    expect(SELECTED_SCALE).toBeGreaterThanOrEqual(1.2);
  });

  it('is not the element colour table of molecular viewers', () => {
    // Jmol's CPK-derived element colours (from memory): P orange, As and Sb and Bi violets, B salmon
    const viewer: Record<string, string> = { P: '#ff8000', As: '#bd80e3', Sb: '#9e63b5', Bi: '#9e4fb5', B: '#ffb5b5' };
    for (const sp of SPECIES_ORDER) expect(de(SPECIES_STYLE[sp].css, viewer[sp]), sp).toBeGreaterThanOrEqual(20);
  });
});

describe('labels over the canvas', () => {
  const panel = over(CANVAS_THEME.labelPanel, CANVAS_THEME.labelPanelAlpha, CANVAS_THEME.ground);
  it('reads at 4.5:1 or better on its panel over the ground (WCAG 2.1 SC 1.4.3)', () => {
    for (const ink of [CANVAS_THEME.labelInk, CANVAS_THEME.labelMuted]) expect(wcagContrast(ink, panel), ink).toBeGreaterThanOrEqual(4.5);
  });
  it('reads at 4.5:1 on the bare ground too (a label drawn without its panel)', () => {
    for (const ink of [CANVAS_THEME.labelInk, CANVAS_THEME.labelMuted]) expect(wcagContrast(ink, CANVAS_THEME.ground), ink).toBeGreaterThanOrEqual(4.5);
  });
  it('blends a panel the way the check assumes (a sanity check of the helper)', () => {
    expect(over('#ffffff', 1, '#000000')).toBe('#ffffff');
    expect(over('#ffffff', 0, '#000000')).toBe('#000000');
  });
});

describe('device colours (host layers, electrodes)', () => {
  // a slab is its tint at layerOpacity over the ground (what the canvas shows where nothing lies behind)
  const slab = (css: string) => over(css, CANVAS_THEME.layerOpacity, CANVAS_THEME.ground);
  it.each(Object.keys(vision))('neighbouring layers differ for %s colour vision (ΔE00 ≥ 10, common practice) and show on the ground', (who) => {
    const f = vision[who];
    // neighbours in stacks of one to nine layers, tinted by place (layerTintOf)
    for (let n = 1; n <= 9; n++)
      for (let k = 0; k + 1 < n; k++) {
        const a = layerTintOf(k), b = layerTintOf(k + 1);
        expect(de(f(slab(a)), f(slab(b))), `layer ${k} (${a}) next to layer ${k + 1} (${b})`).toBeGreaterThanOrEqual(10);
      }
    for (const t of CANVAS_THEME.layerTints) expect(de(f(slab(t)), f(CANVAS_THEME.ground)), t).toBeGreaterThanOrEqual(8);
  });
  it.each(Object.keys(vision))('the silicon / oxide / vacuum stack has three tints that all differ for %s colour vision (ΔE00 ≥ 10)', (who) => {
    const f = vision[who];
    const tints = oxidePreset(0).map((_, k) => slab(layerTintOf(k)));
    expect(tints).toHaveLength(3);
    for (let i = 0; i < tints.length; i++)
      for (let j = i + 1; j < tints.length; j++) expect(de(f(tints[i]), f(tints[j])), `layers ${i} and ${j}`).toBeGreaterThanOrEqual(10);
  });
  it('gives each layer of a four-layer stack its own tint: every two differ by ΔE00 ≥ 10 for typical vision, ≥ 6 with a colour-vision deficiency (the label beside each slab names it: the second cue; common practice)', () => {
    const four = [0, 1, 2, 3].map(layerTintOf);
    expect(new Set(four).size).toBe(4);
    for (const who of Object.keys(vision))
      for (let i = 0; i < 4; i++)
        for (let j = i + 1; j < 4; j++) expect(de(vision[who](slab(four[i])), vision[who](slab(four[j]))), `${who}: layers ${i} and ${j}`).toBeGreaterThanOrEqual(who === 'typical' ? 10 : 6);
  });
  it.each(Object.keys(vision))('electrodes stand apart from every species, the selection and the warnings for %s colour vision (ΔE00 ≥ 10; the box shape is the second cue)', (who) => {
    const f = vision[who];
    for (const [name, css] of [...drawn, ['warning', WARNING_CSS] as const, ['handle', CANVAS_THEME.handle] as const]) expect(de(f(CANVAS_THEME.electrode), f(css)), name).toBeGreaterThanOrEqual(10);
  });
  it('gives electrodes and the layer and electrode outlines 3:1 contrast against the ground (WCAG 2.1 SC 1.4.11)', () => {
    for (const css of [CANVAS_THEME.electrode, CANVAS_THEME.electrodeEdge, CANVAS_THEME.layerEdge]) expect(wcagContrast(css, CANVAS_THEME.ground), css).toBeGreaterThanOrEqual(3);
  });
});
