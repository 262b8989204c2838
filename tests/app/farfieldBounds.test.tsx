/**
 * The kind of each site's boundary bound in the studio's far-field panel (issue 11): the Bound
 * column of the per-site table and the "Boundary bounds in this stack" summary
 * (app/src/features/studio/farfield/boundWords.ts, FarFieldPanel.tsx). The reference is the
 * command line: `check` counts the same sites under the same words (server/cli/checkText.ts
 * layeredSection, whose own output tests/server/cli/checkLayered.test.ts checks), so a modeller
 * reads one story in both. The physics behind the kinds (maximum principle with the stack's image
 * series, Jackson, Classical Electrodynamics, 3rd ed., §4.4) is tested in tests/geometry/farfield.
 * Rendered with react-dom/server (React's own renderer, no browser).
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import type { DesignDocument } from '@contracts/design';
import { BOUND_REASON_CLAUSE, BOUND_REASON_CODES, BOUND_REASON_KIND, BOUND_REASON_WORDS } from '@contracts/farfieldWords';
import { farFieldCheck, type FarFieldReport } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';
import { layeredSection } from '../../server/cli/checkText';
import { boundRank, boundSummary, boundSummaryText, boundWords, hasBoundKinds } from '../../app/src/features/studio/farfield/boundWords';
import { sortSites } from '../../app/src/features/studio/farfield/figures';
import { BoundMark, BoundSummary, FarFieldPanel, ImageEffectSection } from '../../app/src/features/studio/farfield/FarFieldPanel';
import { imageEffectOf } from '../../app/src/features/studio/farfield/imageEffect';
import { siliconOxideVacuum } from '../fixtures/stacks';

const A = 0.5431020511; // Si lattice constant (nm), CODATA 2018

/**
 * An invented row of donors 22 nm under a 5 nm oxide and one 0.6 nm under the interface, in
 * grounded walls: rigorous bounds for the deep ones, an estimate for the shallow one (part of its
 * density lies across the interface). εr 11.7 silicon, 3.9 SiO₂, 1 vacuum (Sze & Ng, Physics of
 * Semiconductor Devices, 3rd ed., Appendix; from memory).
 */
function rowUnderOxide(layers = true): Design {
  return {
    format: 'tetrawell-design',
    version: 2,
    name: 'Invented row under oxide',
    host: {
      material: 'Si',
      epsilonR: 11.7,
      latticeConstantNm: A,
      ...(layers
        ? {
            layers: siliconOxideVacuum(),
          }
        : {}),
    },
    sites: [
      { id: 'r1', species: 'P', position: [-8 * A, 0, -40 * A], electrons: 1 },
      { id: 'top', species: 'P', position: [0, 8 * A, -0.6], electrons: 1 },
      { id: 'r2', species: 'P', position: [0, 0, -40 * A], electrons: 1 },
      { id: 'r3', species: 'P', position: [8 * A, 0, -40 * A], electrons: 1 },
    ],
    domain: { center: [0, 0, -5], halfExtentsNm: [30, 30, 30], boundary: { kind: 'grounded' } },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 1_000_000 },
  };
}

const text = (html: string) => html.replace(/<[^>]*>/g, '').replace(/&quot;/g, '"').replace(/&#x27;/g, "'").replace(/&amp;/g, '&');

describe('bound words shared by the CLI and the studio', () => {
  it('lead each reason with the kind it gives, as check prints it', () => {
    for (const r of BOUND_REASON_CODES) expect(BOUND_REASON_WORDS[r]).toBe(`${BOUND_REASON_KIND[r]}: ${BOUND_REASON_CLAUSE[r]}`);
    // only the stack's image series for densities inside their layer is rigorous (geometry/farfield/layered.ts)
    expect(BOUND_REASON_CODES.filter((r) => BOUND_REASON_KIND[r] === 'rigorous')).toEqual(['image-series']);
  });
});

describe('Bound column and summary', () => {
  const design = rowUnderOxide();
  const report = farFieldCheck(design);
  const doc = design as DesignDocument;

  it('counts the sites by kind and reason as check does', () => {
    expect(hasBoundKinds(report)).toBe(true);
    const groups = boundSummary(report.sites);
    expect(groups.map((g) => [g.kind, g.reason, g.count])).toEqual([
      ['rigorous', 'image-series', 3],
      ['estimated', 'density-leaks', 1],
    ]);
    // the CLI's lines "  N site(s): <kind>: <clause>" for the same report
    const cli = layeredSection(design, report, report.sites.map((s) => s.boundReason));
    const at = cli.indexOf('Boundary bounds in this stack:');
    expect(at).toBeGreaterThan(-1);
    const cliCounts = new Map<string, number>();
    for (const line of cli.slice(at + 1)) {
      const m = /^ {2}(\d+) site\(s\): (.*)$/.exec(line);
      if (!m) break;
      cliCounts.set(m[2], Number(m[1]));
    }
    expect(cliCounts.size).toBe(groups.length);
    for (const g of groups) expect(cliCounts.get(`${g.kind}: ${g.clause}`)).toBe(g.count);
    expect(boundSummaryText(groups)).toBe(
      `Boundary bounds in this stack: 3 sites rigorous — ${BOUND_REASON_CLAUSE['image-series']}; 1 site estimated — ${BOUND_REASON_CLAUSE['density-leaks']}.`,
    );
  });

  it('sorts by kind, rigorous first when ascending, ties in the document order', () => {
    const up = sortSites(report.sites, 'bound', 'ascending').map((s) => s.id);
    expect(up).toEqual(['r1', 'r2', 'r3', 'top']);
    const down = sortSites(report.sites, 'bound', 'descending').map((s) => s.id);
    expect(down).toEqual(['top', 'r1', 'r2', 'r3']);
    expect(boundRank({})).toBeNull();
    expect(boundRank({ boundKind: 'rigorous', boundReason: 'image-series' })!).toBeLessThan(boundRank({ boundKind: 'estimated', boundReason: 'image-series' })!);
  });

  it('marks a bound with its kind, the reason in words as its title and as text for screen readers', () => {
    const html = renderToStaticMarkup(<BoundMark kind="estimated" reason="density-leaks" />);
    expect(html).toContain(`title="${BOUND_REASON_WORDS['density-leaks']}"`);
    expect(html).toContain('data-bound="estimated"');
    expect(html).toMatch(/<span class="sr-only">: the image series of the stack, but part of the density/);
    expect(text(html)).toBe(`estimated: ${BOUND_REASON_CLAUSE['density-leaks']}`);
    expect(boundWords({ boundKind: 'rigorous', boundReason: 'image-series' })).toBe(BOUND_REASON_WORDS['image-series']);
    expect(text(renderToStaticMarkup(<BoundMark kind={undefined} reason={undefined} />))).toBe('—');
  });

  it('shows the summary in the image-charge section, and its text is the summary line', () => {
    const groups = boundSummary(report.sites);
    // what a screen reader and a sighted reader get alike: the clause once, after its kind
    expect(text(renderToStaticMarkup(<BoundSummary groups={groups} />))).toBe(boundSummaryText(groups));
    const effect = imageEffectOf(report)!;
    const html = renderToStaticMarkup(<ImageEffectSection effect={effect} document={doc} target={1e-3} bounds={groups} />);
    expect(html).toContain('aria-label="Boundary bounds"');
    expect(html).toContain('data-bound-group="estimated"');
    // without kinds (old callers): no summary
    expect(renderToStaticMarkup(<ImageEffectSection effect={effect} document={doc} target={1e-3} />)).not.toContain('Boundary bounds');
  });

  it('adds the Bound column only when the report has kinds', () => {
    const panel = (r: FarFieldReport, d: DesignDocument) =>
      renderToStaticMarkup(<FarFieldPanel report={r} computing={false} error={null} document={d} readOnly onApplyRecommended={() => {}} />);
    const layered = panel(report, doc);
    expect(layered).toMatch(/<th[^>]*><button[^>]*>Bound<span aria-hidden="true"><\/span><\/button><\/th>/);
    expect(layered).toContain('Boundary bounds in this stack: ');
    // beside the headline figures: how many site bounds are estimates
    expect(text(layered)).toContain('1 of 4 site bounds are estimated rather than rigorous');
    const plainDesign = rowUnderOxide(false);
    const plain = farFieldCheck(plainDesign);
    expect(hasBoundKinds(plain)).toBe(false);
    const homogeneous = panel(plain, plainDesign as DesignDocument);
    expect(homogeneous).toContain('Clearance');
    expect(homogeneous).not.toMatch(/>Bound</);
    expect(homogeneous).not.toContain('Boundary bounds in this stack');
    expect(homogeneous).not.toContain('estimated-bounds-note');
  });
});
