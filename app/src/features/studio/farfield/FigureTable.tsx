/**
 * A compact sortable table of far-field figures. Only the rows in view are rendered (TanStack
 * Virtual), with spacer rows above and below so the table keeps its semantics and its height.
 */
import { useRef, type ReactNode } from 'react';
import { useVirtualizer } from '@tanstack/react-virtual';
import type { Direction } from './figures';

export interface FigureColumn<T, K extends string> {
  key: K;
  label: string;
  /** shown lower-case after the label, e.g. "nm" */
  unit?: string;
  numeric?: boolean;
  cell: (row: T) => ReactNode;
}

const ROW_PX = 28;

export function FigureTable<T, K extends string>({
  caption, rows, columns, rowKey, sort, onSort, height = 260,
}: {
  caption: string;
  rows: readonly T[];
  columns: FigureColumn<T, K>[];
  rowKey: (row: T) => string;
  sort: { column: K; direction: Direction };
  onSort: (column: K) => void;
  height?: number;
}) {
  const scroller = useRef<HTMLDivElement>(null);
  // eslint-disable-next-line react-hooks/incompatible-library -- the virtualiser's getters are read fresh on every render; nothing here is memoised
  const v = useVirtualizer({ count: rows.length, getScrollElement: () => scroller.current, estimateSize: () => ROW_PX, overscan: 8 });
  const items = v.getVirtualItems();
  const top = items.length ? items[0].start : 0;
  const bottom = items.length ? v.getTotalSize() - items[items.length - 1].end : 0;
  return (
    <div ref={scroller} className="overflow-auto rounded-md border border-wafer-200" style={{ maxHeight: height }}>
      <table className="num w-full text-left text-fine [&_td]:whitespace-nowrap [&_th]:whitespace-nowrap">
        <caption className="sr-only">{caption}</caption>
        <thead className="sticky top-0 bg-wafer-50 text-wafer-600">
          <tr>
            {columns.map((c) => {
              const active = sort.column === c.key;
              return (
                <th key={c.key} scope="col" aria-sort={active ? sort.direction : 'none'} className={`px-2 py-1 font-semibold ${c.numeric ? 'text-right' : ''}`}>
                  <button type="button" onClick={() => onSort(c.key)} className="inline-flex items-center gap-1 hover:text-wafer-900">
                    {c.label}
                    {c.unit && <span className="font-normal">({c.unit})</span>}
                    <span aria-hidden="true">{active ? (sort.direction === 'ascending' ? '▲' : '▼') : ''}</span>
                  </button>
                </th>
              );
            })}
          </tr>
        </thead>
        <tbody className="divide-y divide-wafer-100">
          {top > 0 && (
            <tr aria-hidden="true">
              <td colSpan={columns.length} style={{ height: top, padding: 0 }} />
            </tr>
          )}
          {items.map((it) => {
            const row = rows[it.index];
            return (
              <tr key={rowKey(row)} style={{ height: ROW_PX }}>
                {columns.map((c) => (
                  <td key={c.key} className={`px-2 ${c.numeric ? 'text-right' : ''}`}>
                    {c.cell(row)}
                  </td>
                ))}
              </tr>
            );
          })}
          {bottom > 0 && (
            <tr aria-hidden="true">
              <td colSpan={columns.length} style={{ height: bottom, padding: 0 }} />
            </tr>
          )}
        </tbody>
      </table>
    </div>
  );
}
