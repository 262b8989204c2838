/**
 * U per site and V per pair of a coulomb revision as two sortable tables, in meV with the error bar beside each value,
 * and the model's assumptions with the estimate caveat next to them.
 */
import { useMemo, useState } from 'react';
import { flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { EstimateNote } from '../../components/EstimateNote';
import { meV, type CoulombSummary } from './summaries';

type SiteRow = CoulombSummary['sites'][number];
type PairRow = CoulombSummary['pairs'][number];

const num = (v: number, d = 2) => v.toFixed(d);

const siteColumns: ColumnDef<SiteRow>[] = [
  { accessorKey: 'id', header: 'Site' },
  { id: 'u', accessorFn: (r) => meV(r.uEv), header: 'U (meV)', cell: (c) => num(c.getValue<number>()) },
  { id: 'uErr', accessorFn: (r) => meV(r.uErrorEv), header: '± error (meV)', cell: (c) => num(c.getValue<number>(), 3) },
];
const pairColumns: ColumnDef<PairRow>[] = [
  { id: 'pair', accessorFn: (r) => `${r.a}–${r.b}`, header: 'Pair' },
  { accessorKey: 'distanceNm', header: 'Distance (nm)', cell: (c) => num(c.getValue<number>(), 3) },
  { id: 'v', accessorFn: (r) => meV(r.vEv), header: 'V (meV)', cell: (c) => num(c.getValue<number>()) },
  { id: 'vErr', accessorFn: (r) => meV(r.vErrorEv), header: '± error (meV)', cell: (c) => num(c.getValue<number>(), 3) },
];

export function SortTable<T>({ label, data, columns, initialSorting = [] }: { label: string; data: T[]; columns: ColumnDef<T>[]; initialSorting?: SortingState }) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  // eslint-disable-next-line react-hooks/incompatible-library -- TanStack Table returns fresh functions by design
  const table = useReactTable({ data, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel() });
  return (
    <table aria-label={label} className="num w-full text-note">
      <thead>
        {table.getHeaderGroups().map((hg) => (
          <tr key={hg.id} className="border-b border-wafer-200 text-left">
            {hg.headers.map((h) => {
              const dir = h.column.getIsSorted();
              return (
                <th key={h.id} aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : 'none'} className="px-1.5 py-1 font-semibold">
                  <button type="button" onClick={h.column.getToggleSortingHandler()} className="hover:underline">
                    {flexRender(h.column.columnDef.header, h.getContext())}
                    <span aria-hidden="true">{dir === 'asc' ? ' ▲' : dir === 'desc' ? ' ▼' : ''}</span>
                  </button>
                </th>
              );
            })}
          </tr>
        ))}
      </thead>
      <tbody>
        {table.getRowModel().rows.map((r) => (
          <tr key={r.id} className="border-b border-wafer-100">
            {r.getVisibleCells().map((c) => (
              <td key={c.id} className="px-1.5 py-0.5">
                {flexRender(c.column.columnDef.cell, c.getContext())}
              </td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export const COULOMB_ASSUMPTIONS =
  'U is the classical self-Coulomb integral of each site’s model density and V the Coulomb integral between two sites’ densities, ' +
  'in a homogeneous host of the design’s relative permittivity (no interfaces, gates or screening), without exchange or correlation. ' +
  'Each ± is the solver’s own error estimate (discretisation and far boundary), not a guarantee.';

/** The same for a design with host layers or electrodes (issue 11). */
export const DEVICE_COULOMB_ASSUMPTIONS =
  'U is the classical self-Coulomb integral of each site’s model density and V the Coulomb integral between two sites’ densities, ' +
  'in the design’s planar stack of dielectric layers (flat, sharp interfaces, each layer’s own εr) with its electrodes as ideal metal at their set voltages; ' +
  'no screening by carriers, no exchange or correlation. Each ± is the solver’s own error estimate (discretisation and far boundary), not a guarantee.';

export function CoulombResults({ summary, device = false }: { summary: CoulombSummary; device?: boolean }) {
  const sites = useMemo(() => summary.sites, [summary]);
  const pairs = useMemo(() => summary.pairs, [summary]);
  return (
    <div className="space-y-3">
      <p className="num text-fine text-wafer-600">
        P{summary.order} elements: {summary.elements.toLocaleString('en-US')} tetrahedra, {summary.dofs.toLocaleString('en-US')} unknowns, {summary.iterations} solver iterations. Energies in meV (1 eV = 1000 meV).
      </p>
      <SortTable label="U per site" data={sites} columns={siteColumns} />
      {pairs.length > 0 ? <SortTable label="V per pair" data={pairs} columns={pairColumns} /> : <p className="text-fine text-wafer-600">No pairs were computed.</p>}
      {summary.notes && summary.notes.length > 0 && (
        <ul className="list-disc pl-4 text-fine text-wafer-700">
          {summary.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      )}
      <EstimateNote assumptions={device ? DEVICE_COULOMB_ASSUMPTIONS : COULOMB_ASSUMPTIONS} />
    </div>
  );
}
