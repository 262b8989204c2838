/**
 * The designs of a project as a table (TanStack Table v8): name (opens the design workspace),
 * sites, worst boundary bound, last save and by whom; sort by any column, filter by name or
 * person; start, duplicate, rename and delete for those who may edit designs (viewers see the
 * table only; the server refuses their writes anyway).
 */
import { useMemo, useState, type FormEvent } from 'react';
import { Link } from 'react-router';
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  getFilteredRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { designNameSchema, type DesignSummary, type Project } from '@contracts/api';
import { Button } from '../../components/Button';
import { EstimateNote } from '../../components/EstimateNote';
import { FormAlert, SubmitButton, TextField } from '../../components/Form';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { ApiError } from '../../lib/api';
import { formatDateTime } from '../../lib/format';
import { formErrorsFromError, validateWith } from '../../lib/formErrors';
import { useCreateDesign } from './createDesign';
import { useDeleteDesign } from './deleteDesign';
import { DESIGN_NAME_MAX, boundState, copyName, formatBound, matchesFilter } from './designRows';
import { useDesigns } from './listDesigns';
import { useRenameDesign } from './renameDesign';

const nameBody = designNameSchema;
const column = createColumnHelper<DesignSummary>();
const NO_DESIGNS: DesignSummary[] = [];

export const designPath = (projectId: number, designId: number) => `/projects/${projectId}/designs/${designId}`;

function BoundCell({ d }: { d: DesignSummary }) {
  const state = boundState(d.worstRelBound, d.targetRelError);
  if (state === 'none') {
    return <span className="text-wafer-500">{d.siteCount === 0 ? 'no sites' : 'not computed'}</span>;
  }
  const figure = formatBound(d.worstRelBound!);
  if (state === 'above') {
    return (
      <span className="inline-flex items-center gap-1 font-semibold text-ember-800" title={`Above the design’s target of ${formatBound(d.targetRelError!)}`}>
        <svg aria-hidden="true" viewBox="0 0 12 12" className="h-3 w-3 fill-ember-600">
          <path d="M6 0.8 L11.4 10.8 H0.6 Z" />
        </svg>
        {figure}
        <span className="sr-only"> (above the design’s target of {formatBound(d.targetRelError!)})</span>
      </span>
    );
  }
  return <span>{figure}</span>;
}

function NewDesignForm({ projectId, onCreated }: { projectId: number; onCreated: (d: { id: number; name: string }) => void }) {
  const create = useCreateDesign(projectId);
  const [error, setError] = useState<string | undefined>();
  const [formError, setFormError] = useState<string | null>(null);
  const [key, setKey] = useState(0);
  function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const name = String(new FormData(e.currentTarget).get('name') ?? '');
    const checked = validateWith(nameBody, name, []);
    if (!checked.ok) {
      setError(checked.errors.form ?? 'Check the name.');
      return;
    }
    setError(undefined);
    setFormError(null);
    create.mutate(
      { name: checked.data },
      {
        onSuccess: (d) => {
          setKey((k) => k + 1);
          onCreated(d);
        },
        onError: (err) => {
          const fe = formErrorsFromError(err, ['name']);
          setError(fe.fields.name);
          setFormError(fe.fields.name ? null : fe.form);
        },
      },
    );
  }
  return (
    <form key={key} noValidate onSubmit={onSubmit} aria-label="Start a design" className="flex min-w-0 flex-[2_1_24rem] items-start gap-2">
      <div className="min-w-0 flex-1">
        <TextField label="New design name" name="name" limit={DESIGN_NAME_MAX} error={error ?? formError ?? undefined} hint="For example the array it holds." />
      </div>
      <div className="pt-[1.85rem]">
        <SubmitButton pending={create.isPending} pendingLabel="Starting…">
          Start design
        </SubmitButton>
      </div>
    </form>
  );
}

function RenameRow({ projectId, design, onDone }: { projectId: number; design: DesignSummary; onDone: (message: string | null) => void }) {
  const rename = useRenameDesign(projectId);
  const [error, setError] = useState<string | undefined>();
  function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const checked = validateWith(nameBody, String(new FormData(e.currentTarget).get('name') ?? ''), []);
    if (!checked.ok) return setError(checked.errors.form ?? 'Check the name.');
    if (checked.data === design.name) return onDone(null);
    rename.mutate(
      { designId: design.id, name: checked.data },
      {
        onSuccess: () => onDone(`Renamed to “${checked.data}”.`),
        onError: (err) =>
          setError(
            err instanceof ApiError && err.isConflict
              ? 'Someone saved this design a moment ago. The list now shows their version; try the new name again.'
              : (formErrorsFromError(err, ['name']).fields.name ?? (err instanceof ApiError ? err.message : 'The rename failed. Try again.')),
          ),
      },
    );
  }
  return (
    <form noValidate onSubmit={onSubmit} aria-label={`Rename ${design.name}`} className="space-y-2">
      <TextField label="Design name" name="name" defaultValue={design.name} limit={DESIGN_NAME_MAX} error={error} autoFocus />
      <div className="flex gap-2">
        <SubmitButton pending={rename.isPending} pendingLabel="Saving…">
          Save name
        </SubmitButton>
        <Button variant="secondary" onClick={() => onDone(null)}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

function RowActions({ projectId, design, onRename, onMessage }: { projectId: number; design: DesignSummary; onRename: () => void; onMessage: (m: { tone: 'error' | 'success'; text: string }) => void }) {
  const create = useCreateDesign(projectId);
  const del = useDeleteDesign(projectId);
  const [confirming, setConfirming] = useState(false);
  if (confirming) {
    return (
      <div role="group" aria-label={`Confirm deleting ${design.name}`} className="flex flex-wrap items-center justify-end gap-2">
        <span className="text-note text-garnet-700">Delete for everyone?</span>
        <Button
          variant="danger"
          disabled={del.isPending}
          onClick={() =>
            del.mutate(design.id, {
              onSuccess: () => onMessage({ tone: 'success', text: `Deleted “${design.name}”.` }),
              onError: (err) => {
                setConfirming(false);
                onMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'The delete failed. Try again.' });
              },
            })
          }
        >
          {del.isPending ? 'Deleting…' : 'Delete'}
        </Button>
        <Button variant="secondary" onClick={() => setConfirming(false)}>
          Keep
        </Button>
      </div>
    );
  }
  return (
    <div className="flex justify-end gap-1 whitespace-nowrap">
      <Button
        variant="quiet"
        aria-label={`Duplicate ${design.name}`}
        disabled={create.isPending}
        onClick={() =>
          create.mutate(
            { name: copyName(design.name), copyOf: design.id },
            {
              onSuccess: (d) => onMessage({ tone: 'success', text: `Duplicated as “${d.name}”.` }),
              onError: (err) => onMessage({ tone: 'error', text: err instanceof ApiError ? err.message : 'The duplicate failed. Try again.' }),
            },
          )
        }
      >
        {create.isPending ? 'Duplicating…' : 'Duplicate'}
      </Button>
      <Button variant="quiet" aria-label={`Rename ${design.name}`} onClick={onRename}>
        Rename
      </Button>
      <Button variant="quiet" aria-label={`Delete ${design.name}`} className="text-garnet-700 hover:bg-garnet-50 hover:text-garnet-700" onClick={() => setConfirming(true)}>
        Delete…
      </Button>
    </div>
  );
}

export function DesignsTable({ project }: { project: Project }) {
  const designs = useDesigns(project.id);
  const canEdit = project.capabilities.includes('design.edit');
  const [sorting, setSorting] = useState<SortingState>([{ id: 'updatedAt', desc: true }]);
  const [filter, setFilter] = useState('');
  const [renaming, setRenaming] = useState<number | null>(null);
  const [message, setMessage] = useState<{ tone: 'error' | 'success'; text: string } | null>(null);

  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Name',
        sortingFn: (a, b) => a.original.name.localeCompare(b.original.name, undefined, { numeric: true, sensitivity: 'base' }),
        cell: (c) =>
          renaming === c.row.original.id ? (
            <RenameRow
              projectId={project.id}
              design={c.row.original}
              onDone={(m) => {
                setRenaming(null);
                if (m) setMessage({ tone: 'success', text: m });
              }}
            />
          ) : (
            <Link to={designPath(project.id, c.row.original.id)} className="wrap-anywhere font-semibold text-wafer-900 underline-offset-2 hover:text-phosphor-700 hover:underline">
              {c.getValue()}
            </Link>
          ),
      }),
      column.accessor('siteCount', { header: 'Sites', cell: (c) => c.getValue().toLocaleString('en'), meta: { numeric: true } }),
      column.accessor((d) => d.worstRelBound ?? undefined, {
        id: 'worstRelBound',
        header: 'Worst bound (%)',
        sortUndefined: 'last',
        cell: (c) => <BoundCell d={c.row.original} />,
        meta: { numeric: true },
      }),
      column.accessor('updatedAt', {
        header: 'Updated',
        sortingFn: (a, b) => Date.parse(a.original.updatedAt) - Date.parse(b.original.updatedAt),
        cell: (c) => <time dateTime={c.getValue()}>{formatDateTime(c.getValue())}</time>,
      }),
      column.accessor((d) => d.updatedBy ?? '', {
        id: 'updatedBy',
        header: 'By',
        cell: (c) => (c.row.original.updatedBy ? <span className="wrap-anywhere">{c.row.original.updatedBy}</span> : <span className="text-wafer-500">unknown</span>),
      }),
      ...(canEdit
        ? [
            column.display({
              id: 'actions',
              header: () => <span className="sr-only">Actions</span>,
              cell: (c) =>
                renaming === c.row.original.id ? null : (
                  <RowActions
                    projectId={project.id}
                    design={c.row.original}
                    onRename={() => {
                      setMessage(null);
                      setRenaming(c.row.original.id);
                    }}
                    onMessage={setMessage}
                  />
                ),
            }),
          ]
        : []),
    ],
    [canEdit, project.id, renaming],
  );

  // The React Compiler is not used in this build; TanStack Table is the table library we chose.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data: designs.data ?? NO_DESIGNS,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    // The first click sorts ascending for every column (TanStack would start numbers descending).
    sortDescFirst: false,
    onGlobalFilterChange: setFilter,
    globalFilterFn: (row, _id, value: string) => matchesFilter(row.original, value),
    getRowId: (d) => String(d.id),
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });

  const rows = table.getRowModel().rows;
  const total = designs.data?.length ?? 0;

  return (
    <Panel
      title="Designs"
      description={designs.data ? `${total} ${total === 1 ? 'design' : 'designs'} in this project. Open one to place and move its sites.` : 'The dopant-array designs of this project.'}
    >
      <div className="space-y-4">
        <div className="flex flex-wrap items-start gap-x-8 gap-y-3">
          {total > 0 && (
            <div className="min-w-0 flex-[1_1_14rem]">
              <TextField label="Filter by name or person" name="designFilter" type="search" value={filter} onChange={(e) => setFilter(e.target.value)} />
            </div>
          )}
          {canEdit && (
            <NewDesignForm
              projectId={project.id}
              onCreated={(d) => setMessage({ tone: 'success', text: `Started “${d.name}”. It is in the table; open it to add sites.` })}
            />
          )}
        </div>
        <FormAlert tone={message?.tone ?? 'success'} message={message?.text ?? null} />
        {designs.isPending && <Loading label="Loading designs…" />}
        {designs.isError && <QueryError error={designs.error} what="the designs" onRetry={() => void designs.refetch()} />}
        {designs.data && total === 0 && <p className="text-body text-wafer-600">No designs yet.{canEdit ? ' Start one above.' : ''}</p>}
        {designs.data && total > 0 && (
          <>
            <div className="overflow-x-auto border-y border-wafer-200">
              <table className="w-full text-left text-note">
                <caption className="sr-only">Designs of this project; column headers sort</caption>
                <thead className="text-fine text-wafer-600">
                  {table.getHeaderGroups().map((hg) => (
                    <tr key={hg.id} className="border-b border-wafer-200">
                      {hg.headers.map((h) => {
                        const sorted = h.column.getIsSorted();
                        const numeric = (h.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                        return (
                          <th
                            key={h.id}
                            scope="col"
                            aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : undefined}
                            className={`px-3 py-2 font-semibold whitespace-nowrap ${numeric ? 'text-right' : ''}`}
                          >
                            {h.column.getCanSort() ? (
                              <button type="button" onClick={h.column.getToggleSortingHandler()} className={`inline-flex items-center gap-1 rounded hover:text-wafer-900 ${numeric ? 'flex-row-reverse' : ''}`}>
                                {flexRender(h.column.columnDef.header, h.getContext())}
                                <span aria-hidden="true" className={sorted ? 'text-phosphor-700' : 'text-wafer-300'}>
                                  {sorted === 'asc' ? '▲' : sorted === 'desc' ? '▼' : '↕'}
                                </span>
                              </button>
                            ) : (
                              flexRender(h.column.columnDef.header, h.getContext())
                            )}
                          </th>
                        );
                      })}
                    </tr>
                  ))}
                </thead>
                <tbody className="divide-y divide-wafer-100">
                  {rows.map((r) => (
                    <tr key={r.id} className="align-top hover:bg-wafer-50">
                      {r.getVisibleCells().map((c) => {
                        const numeric = (c.column.columnDef.meta as { numeric?: boolean } | undefined)?.numeric;
                        return (
                          <td key={c.id} className={`px-3 py-2 ${numeric ? 'num text-right whitespace-nowrap' : ''} ${c.column.id === 'name' ? 'min-w-[12rem] max-w-[28rem]' : ''} ${c.column.id === 'updatedAt' ? 'num whitespace-nowrap' : ''}`}>
                            {flexRender(c.column.columnDef.cell, c.getContext())}
                          </td>
                        );
                      })}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
            {rows.length === 0 && <p className="text-note text-wafer-600">No design matches “{filter}”.</p>}
            <EstimateNote assumptions="Worst bound: the largest relative error bound on U and V that the domain box’s boundary may cause, from the far-field check run when the design was last saved (envelope densities in a homogeneous host)." />
          </>
        )}
      </div>
    </Panel>
  );
}
