/**
 * The site table ("Sites"): every site with its derived columns, sortable, editable in place with
 * the document's own zod rules, virtualised (only the rows in view are in the DOM, so 10,000
 * sites scroll smoothly), and in step with the canvas: a click selects, shift-click adds, and a
 * selection made on the canvas scrolls its first row into view.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { flexRender, getCoreRowModel, getSortedRowModel, useReactTable, type ColumnDef, type SortingState } from '@tanstack/react-table';
import { useVirtualizer } from '@tanstack/react-virtual';
import { siteSchema, speciesSchema } from '@contracts/design';
import { SPECIES_PRESETS } from '../../../../geometry/design/presets';
import { useEditor, useEditorStore } from './editorContext';
import type { Site } from './editorStore';
import { ON_LATTICE_TOLERANCE_NM, siteRows, type SiteRow } from './siteColumns';
import { SPECIES_STYLE } from './palette';
import { OrbitalCell } from './OrbitalCell';

const ROW_HEIGHT = 32;

type Field = 'id' | 'species' | 'electrons' | 'x' | 'y' | 'z';

/** Apply a typed-in value to a site; returns the new site or a message saying what is wrong. */
export function editSite(site: Site, field: Field, text: string, otherIds: ReadonlySet<string>): { site: Site } | { error: string } {
  const t = text.trim();
  let next: Site;
  if (field === 'id') {
    if (otherIds.has(t)) return { error: `Another site is already called ${t}.` };
    next = { ...site, id: t };
  } else if (field === 'species') {
    const sp = speciesSchema.safeParse(t.charAt(0).toUpperCase() + t.slice(1).toLowerCase());
    if (!sp.success) return { error: 'Species is one of P, As, Sb, Bi or B.' };
    next = { ...site, species: sp.data };
  } else if (field === 'electrons') {
    if (!/^-?\d+$/.test(t)) return { error: 'Electrons is a whole number: 0, 1 or 2.' };
    next = { ...site, electrons: Number(t) };
  } else {
    const v = Number(t);
    if (t === '' || !Number.isFinite(v)) return { error: 'Type a position in nm, e.g. 4.345.' };
    const k = field === 'x' ? 0 : field === 'y' ? 1 : 2;
    const position: [number, number, number] = [...site.position];
    position[k] = v;
    next = { ...site, position };
  }
  const parsed = siteSchema.safeParse(next);
  if (!parsed.success) {
    const iss = parsed.error.issues[0];
    const what = iss.path.join('.') || field;
    if (what === 'electrons') return { error: 'Electrons must be 0, 1 or 2.' };
    if (what === 'id') return { error: 'A site id has 1 to 64 characters.' };
    return { error: `${what}: ${iss.message}` };
  }
  return { site: next };
}

function EditableCell({ row, field, display, readOnly }: { row: SiteRow; field: Field; display: string; readOnly: boolean }) {
  const store = useEditorStore();
  const [editing, setEditing] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const label = `${field === 'id' ? 'Id' : field === 'x' || field === 'y' || field === 'z' ? `${field} (nm)` : field} of site ${row.site.id}`;
  if (readOnly) return <span>{display}</span>;
  if (!editing)
    return (
      <button
        type="button"
        aria-label={`Edit ${label}`}
        className="w-full cursor-text rounded px-1 text-left hover:bg-phosphor-50 focus-visible:outline-2 focus-visible:outline-phosphor-500"
        onDoubleClick={() => setEditing(true)}
        onKeyDown={(e) => {
          if (e.key === 'Enter' || e.key === 'F2') {
            e.preventDefault();
            e.stopPropagation();
            setEditing(true);
          }
        }}
      >
        {display}
      </button>
    );
  const commit = (text: string) => {
    const doc = store.getState().document;
    const others = new Set(doc.sites.filter((s) => s.id !== row.site.id).map((s) => s.id));
    const result = editSite(row.site, field, text, others);
    if ('error' in result) {
      setError(result.error);
      return false;
    }
    setError(null);
    setEditing(false);
    if (JSON.stringify(result.site) !== JSON.stringify(row.site)) store.getState().updateSite(row.site.id, result.site);
    return true;
  };
  const initial = field === 'x' || field === 'y' || field === 'z' ? String(row.site.position['xyz'.indexOf(field)]) : String(row.site[field]);
  return (
    <span className="relative block">
      <input
        autoFocus
        aria-label={label}
        aria-invalid={error ? true : undefined}
        defaultValue={initial}
        className={`w-full rounded border bg-white px-1 text-note ${error ? 'border-garnet-600' : 'border-phosphor-500'}`}
        onKeyDown={(e) => {
          e.stopPropagation();
          if (e.key === 'Enter') commit(e.currentTarget.value);
          if (e.key === 'Escape') {
            setError(null);
            setEditing(false);
          }
        }}
        onBlur={(e) => {
          if (!commit(e.currentTarget.value)) {
            /* keep the editor open with its message */
          }
        }}
      />
      {error && (
        <span role="alert" className="absolute left-0 top-full z-10 mt-0.5 w-64 rounded bg-garnet-700 px-2 py-1 text-fine text-white">
          {error}
        </span>
      )}
    </span>
  );
}

export function SiteTable({ readOnly }: { readOnly: boolean }) {
  const document = useEditor((s) => s.document);
  const selection = useEditor((s) => s.selection);
  const store = useEditorStore();
  const a = document.host.latticeConstantNm;
  const rows = useMemo(() => siteRows(document.sites, a), [document.sites, a]);
  const selected = useMemo(() => new Set(selection), [selection]);
  const [sorting, setSorting] = useState<SortingState>([]);

  const columns = useMemo<ColumnDef<SiteRow>[]>(
    () => [
      { id: 'id', header: 'Id', accessorFn: (r) => r.site.id, cell: (c) => <EditableCell row={c.row.original} field="id" display={c.row.original.site.id} readOnly={readOnly} />, size: 90 },
      {
        id: 'species',
        header: 'Species',
        accessorFn: (r) => r.site.species,
        cell: (c) => (
          <span className="flex items-center gap-1">
            <span aria-hidden="true" className="inline-block h-2.5 w-2.5 rounded-full" style={{ background: SPECIES_STYLE[c.row.original.site.species].css }} />
            <EditableCell row={c.row.original} field="species" display={`${c.row.original.site.species} (${SPECIES_PRESETS[c.row.original.site.species].kind})`} readOnly={readOnly} />
          </span>
        ),
        size: 130,
      },
      { id: 'electrons', header: 'Electrons', accessorFn: (r) => r.site.electrons, cell: (c) => <EditableCell row={c.row.original} field="electrons" display={String(c.row.original.site.electrons)} readOnly={readOnly} />, size: 80 },
      ...(['x', 'y', 'z'] as const).map<ColumnDef<SiteRow>>((ax, k) => ({
        id: ax,
        header: `${ax} (nm)`,
        accessorFn: (r) => r.site.position[k],
        cell: (c) => <EditableCell row={c.row.original} field={ax} display={c.row.original.site.position[k].toFixed(3)} readOnly={readOnly} />,
        size: 90,
      })),
      {
        id: 'lattice',
        header: 'Lattice i, j, k (a/4)',
        accessorFn: (r) => r.lattice.index.join(','),
        sortingFn: (p, q) => {
          const u = p.original.lattice.index, v = q.original.lattice.index;
          return u[2] - v[2] || u[1] - v[1] || u[0] - v[0];
        },
        cell: (c) => {
          const l = c.row.original.lattice;
          return (
            <span>
              {l.index.join(', ')}
              {l.offsetNm > ON_LATTICE_TOLERANCE_NM && <span className="ml-1 rounded bg-ember-100 px-1 text-fine text-ember-800">off lattice by {l.offsetNm.toFixed(3)} nm</span>}
            </span>
          );
        },
        size: 170,
      },
      {
        id: 'nearest',
        header: 'Nearest site (nm)',
        accessorFn: (r) => r.nearestNm,
        cell: (c) => (Number.isFinite(c.row.original.nearestNm) ? c.row.original.nearestNm.toFixed(3) : '—'),
        size: 110,
      },
      {
        id: 'orbital',
        header: 'Orbital',
        accessorFn: (r) => r.orbitalText,
        cell: (c) => <OrbitalCell row={c.row.original} readOnly={readOnly} />,
        size: 260,
      },
    ],
    [readOnly],
  );

  // eslint-disable-next-line react-hooks/incompatible-library -- TanStack Table returns fresh functions by design
  const table = useReactTable({ data: rows, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel(), getRowId: (r) => String(r.index) });
  const tableRows = table.getRowModel().rows;
  const scrollRef = useRef<HTMLDivElement>(null);
  const virtualizer = useVirtualizer({ count: tableRows.length, getScrollElement: () => scrollRef.current, estimateSize: () => ROW_HEIGHT, overscan: 12 });

  // a selection made elsewhere (canvas) brings its first row into view
  const firstSelected = selection[0];
  useEffect(() => {
    if (!firstSelected) return;
    const at = tableRows.findIndex((r) => r.original.site.id === firstSelected);
    if (at >= 0) virtualizer.scrollToIndex(at, { align: 'auto' });
  }, [firstSelected, tableRows, virtualizer]);

  const widths = table.getVisibleLeafColumns().map((c) => c.getSize());
  const gridTemplate = widths.map((w) => `minmax(${w}px, ${w}fr)`).join(' ');
  const items = virtualizer.getVirtualItems();

  return (
    <div ref={scrollRef} className="h-full overflow-auto rounded-md border border-wafer-200 bg-white" tabIndex={-1}>
      <table aria-label="Sites" aria-rowcount={tableRows.length + 1} className="num grid min-w-[1100px] text-note">
        <thead className="sticky top-0 z-10 grid bg-wafer-50">
          {table.getHeaderGroups().map((hg) => (
            <tr key={hg.id} aria-rowindex={1} className="grid" style={{ gridTemplateColumns: gridTemplate }}>
              {hg.headers.map((h) => {
                const dir = h.column.getIsSorted();
                return (
                  <th key={h.id} scope="col" aria-sort={dir === 'asc' ? 'ascending' : dir === 'desc' ? 'descending' : 'none'} className="px-2 py-1.5 text-left text-fine font-semibold text-wafer-600">
                    <button type="button" onClick={h.column.getToggleSortingHandler()} className="rounded hover:text-wafer-900 focus-visible:outline-2 focus-visible:outline-phosphor-500">
                      {flexRender(h.column.columnDef.header, h.getContext())}
                      <span aria-hidden="true" className="ml-0.5">{dir === 'asc' ? '▲' : dir === 'desc' ? '▼' : ''}</span>
                    </button>
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody className="relative grid" style={{ height: virtualizer.getTotalSize() }}>
          {items.map((v) => {
            const row = tableRows[v.index];
            const id = row.original.site.id;
            const isSel = selected.has(id);
            return (
              <tr
                key={row.id}
                aria-rowindex={v.index + 2}
                aria-selected={isSel}
                data-site-id={id}
                className={`absolute left-0 grid w-full border-b border-wafer-100 ${isSel ? 'bg-phosphor-100' : 'hover:bg-wafer-50'}`}
                style={{ transform: `translateY(${v.start}px)`, height: ROW_HEIGHT, gridTemplateColumns: gridTemplate }}
                onClick={(e) => store.getState().select([id], e.shiftKey ? 'toggle' : 'replace')}
              >
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="flex items-center overflow-visible whitespace-nowrap px-2">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            );
          })}
        </tbody>
      </table>
      {rows.length === 0 && <p className="p-3 text-note text-wafer-600">No sites yet. Build an array, import a file, or place donors on the canvas.</p>}
    </div>
  );
}
