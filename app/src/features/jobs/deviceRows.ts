/**
 * The device part of a coulomb revision (issue 11) as table rows: one row per site with its energy
 * at the design's voltages and its lever arm on each electrode (meV/V ± error). Pure, so the
 * views' tests need no browser. Keys are the summary's (`siteEnergies[{ id, eV }]`,
 * `leverArms[{ site, electrode, meVPerV, errorMeVPerV }]`).
 */
import type { CoulombSummary } from './summaries';

export interface LeverCell {
  meVPerV: number;
  errorMeVPerV: number;
}

export interface DeviceRow {
  site: string;
  /** energy at the design's voltages (eV), null when the summary has none for this site */
  energyEv: number | null;
  arms: Record<string, LeverCell>;
}

export interface DeviceTable {
  /** electrodes in the order the summary first names them */
  electrodes: string[];
  rows: DeviceRow[];
}

/** Does the summary carry device results to show? */
export function hasDeviceResults(s: CoulombSummary): boolean {
  return s.siteEnergies !== undefined || s.leverArms !== undefined;
}

/** Rows in the summary's site order (sites only named by the device lists follow, in their order). */
export function deviceTable(s: CoulombSummary): DeviceTable {
  const electrodes: string[] = [];
  const seen = new Set<string>();
  const rows = new Map<string, DeviceRow>();
  const row = (site: string) => {
    let r = rows.get(site);
    if (!r) {
      r = { site, energyEv: null, arms: {} };
      rows.set(site, r);
    }
    return r;
  };
  for (const x of s.sites) row(x.id);
  for (const e of s.siteEnergies ?? []) row(e.id).energyEv = e.eV;
  for (const a of s.leverArms ?? []) {
    if (!seen.has(a.electrode)) {
      seen.add(a.electrode);
      electrodes.push(a.electrode);
    }
    row(a.site).arms[a.electrode] = { meVPerV: a.meVPerV, errorMeVPerV: a.errorMeVPerV };
  }
  // sites of the solve without any device figure add nothing to this table
  const out = [...rows.values()].filter((r) => r.energyEv !== null || Object.keys(r.arms).length > 0);
  return { electrodes, rows: out };
}
