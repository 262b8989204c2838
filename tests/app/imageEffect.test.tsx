/**
 * The image-charge figure in the studio's far-field panel (app/src/features/studio/farfield/
 * imageEffect.ts and ImageEffectSection), with hand-made reports in the shape agreed for issue 11
 * (`imageEffect: { worstURel, worstUSite, worstVRel, worstVPair, tailBoundEv, maxLeak, findings }`,
 * fractions signed). Rendered with react-dom/server (React's own renderer, no browser).
 * Physics named in the words: a charge in a high-εr medium near a lower-εr one has a like-signed
 * image, near a metal an opposite one (J. D. Jackson, Classical Electrodynamics, 3rd ed., §2.1
 * and §4.4), so U goes up near oxide or vacuum and down near metal.
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import type { DesignDocument } from '@contracts/design';
import type { FarFieldReport } from '../../geometry/farfield';
import { findingText, imageEffectMeaning, imageEffectOf, signedPercent, siteName, type ImageEffectFigure } from '../../app/src/features/studio/farfield/imageEffect';
import { ImageEffectSection } from '../../app/src/features/studio/farfield/FarFieldPanel';
import { oxidePreset } from '../../app/src/features/studio/device/deviceEdit';

const doc: DesignDocument = {
  format: 'tetrawell-design',
  version: 2,
  name: 'Invented shallow pair',
  host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511, layers: oxidePreset(0) },
  sites: [
    { id: 'q1', species: 'P', position: [0, 0, -4], electrons: 1 },
    { id: 'q2', species: 'P', position: [4.3, 0, -4], electrons: 1 },
  ],
  domain: { center: [0, 0, -5], halfExtentsNm: [20, 20, 20], boundary: { kind: 'grounded' } },
  electrodes: [{ name: 'side lead', minNm: [10, -2, -5], maxNm: [15, 2, -3], voltageV: 0.1 }],
  refinement: { order: 2, targetRelError: 0.01, maxElements: 100000 },
};

const effect: ImageEffectFigure = {
  worstURel: 0.1234,
  worstUSite: 'q2',
  worstVRel: -0.0456,
  worstVPair: ['q1', 'q2'],
  tailBoundEv: 2e-9,
  maxLeak: 0.003,
  findings: [{ code: 'electrode-not-plane', index: 0 }],
};

describe('image-charge effect in the studio', () => {
  it('is read from the report when present and absent otherwise', () => {
    const bare = { warnings: [] } as unknown as FarFieldReport;
    expect(imageEffectOf(bare)).toBeNull();
    expect(imageEffectOf(null)).toBeNull();
    expect(imageEffectOf({ ...bare, imageEffect: effect } as unknown as FarFieldReport)).toBe(effect);
  });

  it('writes signed percentages and names sites by id or by index', () => {
    expect(signedPercent(0.1234)).toBe('+12.3\u00a0%');
    expect(signedPercent(-0.0456)).toBe('−4.56\u00a0%');
    expect(signedPercent(null)).toBe('—');
    expect(siteName(1, doc)).toBe('q2');
    expect(siteName('q1', doc)).toBe('q1');
  });

  it('says whether the stack matters against the design target', () => {
    expect(imageEffectMeaning(effect, 0.01)).toMatch(/^The stack matters here/);
    expect(imageEffectMeaning({ ...effect, worstURel: 0.001, worstVRel: -0.002 }, 0.01)).toMatch(/less than the design’s target/);
    expect(imageEffectMeaning({ ...effect, worstURel: null, worstVRel: null }, 0.01)).toMatch(/No site or pair/);
  });

  it('words the findings with the electrode or layer names', () => {
    expect(findingText({ code: 'electrode-not-plane', index: 0 }, doc)).toMatch(/“side lead” does not span/);
    expect(findingText({ code: 'too-many-interfaces', value: 3 }, doc)).toMatch(/\(3\)/);
    expect(findingText({ code: 'some-new-code' }, doc)).toBe('some-new-code');
    // the electrode checks of geometry/farfield/layered.ts, with their unit (nm, %) and names
    expect(findingText({ code: 'site-near-electrode', index: 1, value: 5.703903183109506 }, doc)).toBe(
      'Site q2 is 5.70 nm from an electrode: an ideal metal face and a fixed density are least reliable this close.',
    );
    expect(findingText({ code: 'electrode-clipped', index: 0, value: 0.5 }, doc)).toMatch(/“side lead” reaches outside the domain box and is clipped to it \(50\.0\u00a0% of its volume kept\)/);
    expect(findingText({ code: 'electrode-outside-domain', index: 0 }, doc)).toMatch(/“side lead” lies wholly outside the domain box/);
  });

  it('renders the worst ΔU/U and ΔV/V with site and pair, the meaning and the notes', () => {
    const html = renderToStaticMarkup(<ImageEffectSection effect={effect} document={doc} target={0.01} />);
    expect(html).toContain('aria-label="Image-charge effect"');
    expect(html).toContain('+12.3\u00a0%');
    expect(html).toContain('at site q2');
    expect(html).toContain('−4.56\u00a0%');
    expect(html).toContain('for pair q1–q2');
    expect(html).toContain('The stack matters here');
    expect(html).toContain('εr 11.7');
    expect(html).toMatch(/side lead/);
  });
});
