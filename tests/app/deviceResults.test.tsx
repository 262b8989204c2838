/**
 * The lever-arm and site-energy view of a coulomb revision (app/src/features/jobs/DeviceResults.tsx,
 * deviceRows.ts, summaries.ts) with hand-made summaries in the shape agreed for issue 11
 * (`siteEnergies: [{ id, eV }]`, `leverArms: [{ site, electrode, meVPerV, errorMeVPerV }]`).
 * Rendered with react-dom/server (React's own renderer). Units: 1 eV = 1000 meV (SI prefixes).
 */
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import type { DesignDocument } from '@contracts/design';
import { coulombSummarySchema, type CoulombSummary } from '../../app/src/features/jobs/summaries';
import { deviceTable, hasDeviceResults } from '../../app/src/features/jobs/deviceRows';
import { DeviceResults } from '../../app/src/features/jobs/DeviceResults';
import { CoulombResults, DEVICE_COULOMB_ASSUMPTIONS, COULOMB_ASSUMPTIONS } from '../../app/src/features/jobs/CoulombTable';

const base = {
  order: 2,
  elements: 1200,
  dofs: 1800,
  iterations: 14,
  sites: [
    { id: 'a1', uEv: 0.0521, uErrorEv: 0.0001 },
    { id: 'a2', uEv: 0.0519, uErrorEv: 0.0001 },
    { id: 'a3', uEv: 0.0523, uErrorEv: 0.0001 },
  ],
  pairs: [],
};
const device: CoulombSummary = coulombSummarySchema.parse({
  ...base,
  siteEnergies: [
    { id: 'a1', eV: -0.0123 },
    { id: 'a2', eV: -0.0456 },
    { id: 'a3', eV: 0.0012 },
  ],
  leverArms: [
    { site: 'a1', electrode: 'top gate', meVPerV: -12.3, errorMeVPerV: 0.4 },
    { site: 'a1', electrode: 'plunger', meVPerV: -80.5, errorMeVPerV: 1.25 },
    { site: 'a2', electrode: 'top gate', meVPerV: -45.6, errorMeVPerV: 0.5 },
    { site: 'a2', electrode: 'plunger', meVPerV: -10.1, errorMeVPerV: 0.2 },
    { site: 'a3', electrode: 'top gate', meVPerV: -2.2, errorMeVPerV: 0.1 },
  ],
});
const design = {
  electrodes: [
    { name: 'top gate', minNm: [-20, -20, 5], maxNm: [20, 20, 6], voltageV: 0.25 },
    { name: 'plunger', minNm: [-2, -2, 5], maxNm: [2, 2, 7], voltageV: -0.1 },
  ],
  host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: 0.5431020511 },
} as unknown as DesignDocument;

/** site ids in the order the rendered table lists them */
const order = (html: string) => [...html.matchAll(/<td[^>]*>(a\d)<\/td>/g)].map((m) => m[1]);

describe('device results of a coulomb revision', () => {
  it('keeps summaries without device keys valid and without a device table', () => {
    const old = coulombSummarySchema.parse(base);
    expect(hasDeviceResults(old)).toBe(false);
    expect(hasDeviceResults(device)).toBe(true);
    // an empty list (a design with electrodes but nothing to report) still counts as present
    expect(hasDeviceResults(coulombSummarySchema.parse({ ...base, leverArms: [], siteEnergies: [] }))).toBe(true);
    expect(coulombSummarySchema.safeParse({ ...base, leverArms: [{ site: 'a1', electrode: 'g', meVPerV: 'x', errorMeVPerV: 0 }] }).success).toBe(false);
  });

  it('builds one row per site with its energy and its lever arm on each electrode', () => {
    const t = deviceTable(device);
    expect(t.electrodes).toEqual(['top gate', 'plunger']);
    expect(t.rows.map((r) => r.site)).toEqual(['a1', 'a2', 'a3']);
    expect(t.rows[0].arms.plunger).toEqual({ meVPerV: -80.5, errorMeVPerV: 1.25 });
    expect(t.rows[2].arms.plunger).toBeUndefined();
    expect(t.rows[1].energyEv).toBe(-0.0456);
  });

  it('renders meV/V ± error, site energies in meV at the design voltages, and the assumptions', () => {
    const html = renderToStaticMarkup(<DeviceResults summary={device} design={design} />);
    expect(html).toContain('top gate (meV/V)');
    expect(html).toContain('plunger (meV/V)');
    expect(html).toContain('Site energy (meV)');
    expect(html).toContain('-80.50 ± 1.25');
    expect(html).toContain('-45.60'); // −0.0456 eV = −45.6 meV
    expect(html).toContain('top gate +0.25 V, plunger −0.1 V');
    expect(html).toContain('—'); // a3 has no plunger figure
    expect(html).toContain('About these numbers'); // <EstimateNote />
    expect(html).toContain('heavily doped lead is modelled as a metal box');
  });

  it('sorts by a lever-arm column and by site energy (missing values last)', () => {
    const byTop = renderToStaticMarkup(<DeviceResults summary={device} design={design} initialSorting={[{ id: 'arm:top gate', desc: false }]} />);
    expect(order(byTop)).toEqual(['a2', 'a1', 'a3']);
    expect(byTop).toContain('aria-sort="ascending"');
    const byPlungerDesc = renderToStaticMarkup(<DeviceResults summary={device} design={design} initialSorting={[{ id: 'arm:plunger', desc: true }]} />);
    expect(order(byPlungerDesc)).toEqual(['a2', 'a1', 'a3']);
    const byEnergy = renderToStaticMarkup(<DeviceResults summary={device} design={design} initialSorting={[{ id: 'energy', desc: true }]} />);
    expect(order(byEnergy)).toEqual(['a3', 'a1', 'a2']);
  });

  it('says a layered or gated solve is not a homogeneous host', () => {
    expect(renderToStaticMarkup(<CoulombResults summary={device} device />)).toContain(DEVICE_COULOMB_ASSUMPTIONS.slice(0, 60));
    expect(renderToStaticMarkup(<CoulombResults summary={device} />)).toContain('homogeneous host');
    expect(DEVICE_COULOMB_ASSUMPTIONS).not.toBe(COULOMB_ASSUMPTIONS);
  });
});
