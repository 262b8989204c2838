/**
 * Lever arms and site energies of a coulomb revision (issue 11): one sortable table, a row per
 * site, its energy at the design's voltages (meV) and its lever arm on each electrode
 * (meV/V ± the solver's error), with the voltages the energies hold for and the assumptions line.
 */
import { useMemo } from 'react';
import type { ColumnDef, SortingState } from '@tanstack/react-table';
import type { DesignDocument } from '@contracts/design';
import { EstimateNote } from '../../components/EstimateNote';
import { SortTable } from './CoulombTable';
import { deviceTable, type DeviceRow } from './deviceRows';
import { meV, type CoulombSummary } from './summaries';

export const LEVER_ASSUMPTIONS =
  'A lever arm is the shift of a site’s energy per volt on one electrode with the others held, −e∫ρφ from the Laplace solution with that electrode at 1 V ' +
  '(negative for an electron under a positive gate, the sign flips for a hole); a site energy adds every electrode at its set voltage. ' +
  'Electrodes are ideal metal (a heavily doped lead is modelled as a metal box), the layers flat dielectrics, the domain walls as the design chooses.';

const fmtV = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v)} V`;

export function DeviceResults({ summary, design, initialSorting }: { summary: CoulombSummary; design: DesignDocument | null; initialSorting?: SortingState }) {
  const table = useMemo(() => deviceTable(summary), [summary]);
  const columns = useMemo<ColumnDef<DeviceRow>[]>(() => {
    const cols: ColumnDef<DeviceRow>[] = [{ accessorKey: 'site', header: 'Site' }];
    if (summary.siteEnergies)
      cols.push({
        id: 'energy',
        accessorFn: (r) => (r.energyEv === null ? undefined : meV(r.energyEv)),
        sortUndefined: 'last',
        header: 'Site energy (meV)',
        cell: (c) => {
          const v = c.getValue<number | undefined>();
          return v === undefined ? '—' : v.toFixed(2);
        },
      });
    for (const e of table.electrodes)
      cols.push({
        id: `arm:${e}`,
        accessorFn: (r) => r.arms[e]?.meVPerV,
        sortUndefined: 'last',
        header: `${e} (meV/V)`,
        cell: (c) => {
          const a = c.row.original.arms[e];
          return a ? `${a.meVPerV.toFixed(2)} ± ${a.errorMeVPerV.toFixed(2)}` : '—';
        },
      });
    return cols;
  }, [summary.siteEnergies, table.electrodes]);
  const voltages = design?.electrodes?.map((e) => `${e.name} ${fmtV(e.voltageV)}`).join(', ');
  return (
    <section aria-label="Lever arms and site energies" className="space-y-2">
      <h3 className="text-note font-semibold text-wafer-800">Lever arms and site energies</h3>
      {table.rows.length === 0 ? (
        <p className="text-fine text-wafer-600">This solve has no lever arms or site energies (no electrodes in its design).</p>
      ) : (
        <>
          <p className="num text-fine text-wafer-600">
            Lever arms in meV/V (± the solver’s error); site energies in meV (1 eV = 1000 meV) at the design’s voltages{voltages ? `: ${voltages}` : ''}.
          </p>
          <div className="overflow-x-auto">
            <SortTable label="Lever arms and site energies" data={table.rows} columns={columns} initialSorting={initialSorting} />
          </div>
        </>
      )}
      <EstimateNote assumptions={LEVER_ASSUMPTIONS} />
    </section>
  );
}
