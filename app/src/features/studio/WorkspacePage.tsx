/**
 * The design workspace, route /projects/:projectId/designs/:designId (loaded lazily: three.js and
 * the canvas ship in this route's chunk only).
 *
 * Layout, built around the canvas: a slim strip on top (where you are, the save state, history,
 * export); the canvas in the middle with the view buttons on it; the "build" column on the left
 * (tools, array builder, import); the "check" column on the right (far-field check, domain box and
 * refinement settings, model assumptions); the site table under the canvas.
 */
import { lazy, Suspense, useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import { useQueryClient } from '@tanstack/react-query';
import type { DesignDocument } from '@contracts/design';
import { MODEL_ASSUMPTIONS } from '../../../../geometry/farfield';
import { PRESET_ASSUMPTION_NOTE } from '../../../../geometry/design/presets';
import type { Species } from '../../../../geometry/design/types';
import { Button } from '../../components/Button';
import { EstimateNote } from '../../components/EstimateNote';
import { Loading, QueryError } from '../../components/QueryState';
import { ApiError } from '../../lib/api';
import { formatDateTime } from '../../lib/format';
import { RunsSection } from '../jobs/RunsSection';
import { useProject } from '../projects/getProject';
import type { Tool, ViewApi } from './canvas/DesignCanvas';
import { createDesign } from './createDesign';
import { DomainBoxForm } from './DomainBoxForm';
import { ElectrodesForm } from './device/ElectrodesForm';
import { LayerStackForm } from './device/LayerStackForm';
import { EditorContext, useEditor, useHistoryDepth } from './editorContext';
import { createEditorStore, type EditorStore, type Vec3 } from './editorStore';
import { EXPORT_FORMATS, EXPORT_LABELS, exportHref } from './exportDesign';
import { FarFieldPanel, useFarField } from './farfieldAdapter';
import { GeneratorForm } from './GeneratorForm';
import { designQuery, fetchDesign, useDesign } from './getDesign';
import { ImportPanel } from './ImportPanel';
import { SiteTable } from './SiteTable';
import { SPECIES_ORDER, SPECIES_STYLE } from './palette';
import { useAutosave, type SaveState } from './useAutosave';

const DesignCanvas = lazy(() => import('./canvas/DesignCanvas'));

export const SHORTCUTS: [string, string][] = [
  ['V', 'Select tool: click a site, shift-click to add or remove, drag on empty space for a selection band'],
  ['P', 'Place tool: click on the active layer to put a donor on the lattice site under the pointer'],
  ['M', 'Move tool: drag the handle; every moved site snaps to its nearest lattice site'],
  ['Delete / Backspace', 'Delete the selected sites'],
  ['Arrow keys', 'Move the selection by one lattice constant along [100] or [010]'],
  ['Page Up / Page Down', 'Move the selection by one lattice constant along [001]'],
  ['[ and ]', 'Active placement layer down or up by a/4'],
  ['Ctrl+Z', 'Undo'],
  ['Ctrl+Shift+Z or Ctrl+Y', 'Redo'],
  ['F', 'Fit everything in view'],
  ['1, 2, 3', 'Look along [001], [100], [110]'],
  ['Escape', 'Clear the selection'],
  ['?', 'Show or hide this sheet'],
  ['Right drag / middle drag', 'Turn / pan the view in the select tool (left drag turns in the other tools); wheel zooms'],
];

export default function WorkspacePage() {
  const { projectId: p, designId: d } = useParams();
  const projectId = Number(p), designId = Number(d);
  const valid = Number.isInteger(projectId) && projectId > 0 && Number.isInteger(designId) && designId > 0;
  const project = useProject(valid ? projectId : 0, valid);
  const design = useDesign(valid ? projectId : 0, valid ? designId : 0);
  if (!valid || [project.error, design.error].some((e) => e instanceof ApiError && (e.status === 404 || e.status === 403)))
    return (
      <div className="p-6">
        <h1 className="text-title font-bold">Design not found</h1>
        <p className="text-body text-wafer-600">It does not exist, was deleted, or you are not a member of its project.</p>
        <Link to={valid ? `/projects/${projectId}` : '/projects'} className="font-semibold text-phosphor-700 underline-offset-2 hover:underline">
          Back
        </Link>
      </div>
    );
  if (project.isPending || design.isPending) return <Loading label="Opening the design…" />;
  if (project.isError) return <QueryError error={project.error} what="the project" onRetry={() => void project.refetch()} />;
  if (design.isError) return <QueryError error={design.error} what="the design" onRetry={() => void design.refetch()} />;
  return <Workspace key={designId} projectId={projectId} projectName={project.data.name} designId={designId} initial={design.data} readOnly={!project.data.capabilities.includes('design.edit')} canRun={project.data.capabilities.includes('mesh.create')} />;
}

function SaveBadge({ state, dirty, readOnly }: { state: SaveState; dirty: boolean; readOnly: boolean }) {
  let text: string;
  let tone = 'text-wafer-600';
  if (readOnly) text = 'Read only: you can look and export, not edit';
  else if (state.kind === 'saving') text = 'Saving…';
  else if (state.kind === 'stale') {
    text = 'Not saved: someone else saved first';
    tone = 'text-garnet-700';
  } else if (state.kind === 'failed') {
    text = `Not saved: ${state.message}`;
    tone = 'text-garnet-700';
  } else if (dirty || state.kind === 'pending') text = 'Unsaved edits (saving shortly)';
  else text = `Saved as version ${state.version}${state.at ? `, ${formatDateTime(state.at)}` : ''}`;
  return (
    <span role="status" aria-label="Save state" className={`text-fine ${tone}`}>
      {text}
    </span>
  );
}

function Assumptions() {
  return (
    <section aria-label="Model assumptions" className="space-y-1.5 text-fine text-wafer-700">
      <h2 className="font-bold uppercase tracking-wider text-wafer-500">What the model assumes</h2>
      <ul className="list-disc space-y-1 pl-4">
        <li>Each site's density is an effective-mass envelope (hydrogenic, anisotropic single-valley or Gaussian), not an atomistic wavefunction.</li>
        {MODEL_ASSUMPTIONS.map((t) => (
          <li key={t}>{t}</li>
        ))}
        <li>
          <span className="font-semibold">Electrons</span> counts the carriers bound to a site (0 = ionised core). For a boron acceptor it counts holes: the check uses the donor envelope and treats every site as a like unit charge.
        </li>
        <li>{PRESET_ASSUMPTION_NOTE}</li>
      </ul>
      <EstimateNote />
    </section>
  );
}

function StaleChoice({ state, onReload, onCopy, busy }: { state: Extract<SaveState, { kind: 'stale' }>; onReload: () => void; onCopy: () => void; busy: boolean }) {
  const c = state.current;
  return (
    <div role="alertdialog" aria-label="Someone saved this design first" aria-describedby="stale-text" className="border-b border-garnet-300 bg-garnet-50 px-4 py-2 text-note text-garnet-700">
      <p id="stale-text">
        <span className="font-semibold">Someone saved this design first. </span>
        {c ? `${c.updatedBy ?? 'Another member'} saved version ${c.version} on ${formatDateTime(c.updatedAt)}.` : state.message} Your edits are still here and have not been saved over theirs.
      </p>
      <div className="mt-1.5 flex flex-wrap gap-2">
        <Button variant="secondary" disabled={busy} onClick={onReload}>
          Reload theirs
        </Button>
        <Button disabled={busy} onClick={onCopy}>
          Keep mine as a copy
        </Button>
      </div>
    </div>
  );
}

function Workspace({ projectId, projectName, designId, initial, readOnly, canRun }: { projectId: number; projectName: string; designId: number; initial: { document: DesignDocument; version: number; updatedAt: string; updatedBy: string | null }; readOnly: boolean; canRun: boolean }) {
  const [store] = useState<EditorStore>(() => createEditorStore(initial.document));
  const autosave = useAutosave(store, projectId, designId, initial.version, initial.updatedAt, !readOnly);
  return (
    <EditorContext.Provider value={store}>
      <WorkspaceBody projectId={projectId} projectName={projectName} designId={designId} readOnly={readOnly} canRun={canRun} autosave={autosave} store={store} />
    </EditorContext.Provider>
  );
}

function ViewButtons({ viewRef }: { viewRef: React.RefObject<ViewApi | null> }) {
  const cls = 'rounded border border-wafer-200 bg-white/95 px-2 py-1 text-fine font-semibold text-wafer-800 hover:bg-wafer-100 focus-visible:outline-2 focus-visible:outline-phosphor-500';
  return (
    <div role="toolbar" aria-label="View" className="absolute left-2 top-2 flex gap-1">
      <button type="button" className={cls} onClick={() => viewRef.current?.fit()}>Fit to view</button>
      <button type="button" className={cls} onClick={() => viewRef.current?.view('001')}>Along [001]</button>
      <button type="button" className={cls} onClick={() => viewRef.current?.view('100')}>Along [100]</button>
      <button type="button" className={cls} onClick={() => viewRef.current?.view('110')}>Along [110]</button>
    </div>
  );
}

function isTyping(t: EventTarget | null): boolean {
  return t instanceof HTMLElement && (t.tagName === 'INPUT' || t.tagName === 'TEXTAREA' || t.tagName === 'SELECT' || t.isContentEditable);
}

function WorkspaceBody({ projectId, projectName, designId, readOnly, canRun, autosave, store }: { projectId: number; projectName: string; designId: number; readOnly: boolean; canRun: boolean; autosave: ReturnType<typeof useAutosave>; store: EditorStore }) {
  const doc = useEditor((s) => s.document);
  const selection = useEditor((s) => s.selection);
  const history = useHistoryDepth();
  const [preview, setPreview] = useState<DesignDocument | null>(null);
  const shown = preview ?? doc;
  const farField = useFarField(shown);
  const [tool, setTool] = useState<Tool>('select');
  const [species, setSpecies] = useState<Species>('P');
  const a = doc.host.latticeConstantNm;
  const [layerK, setLayerK] = useState(() => Math.round((doc.domain.center[2] * 4) / a));
  const [help, setHelp] = useState(false);
  const [busy, setBusy] = useState(false);
  const viewRef = useRef<ViewApi | null>(null);
  const navigate = useNavigate();
  const qc = useQueryClient();

  const undo = useCallback(() => store.temporal.getState().undo(), [store]);
  const redo = useCallback(() => store.temporal.getState().redo(), [store]);

  const nudge = useCallback(
    (axis: 0 | 1 | 2, sign: 1 | -1) => {
      const st = store.getState();
      if (st.selection.length === 0) return;
      const sel = new Set(st.selection);
      const moved: Record<string, Vec3> = {};
      // one lattice constant along a cube axis is a lattice translation: sites stay on the lattice
      for (const s of st.document.sites)
        if (sel.has(s.id)) {
          const q: Vec3 = [...s.position];
          q[axis] += sign * st.document.host.latticeConstantNm;
          moved[s.id] = q;
        }
      st.moveSites(moved);
    },
    [store],
  );

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (isTyping(e.target)) return;
      const mod = e.ctrlKey || e.metaKey;
      const k = e.key;
      if (k === '?') return setHelp((h) => !h);
      if (k === 'Escape') {
        setHelp(false);
        return store.getState().select([]);
      }
      if (k === 'f' || k === 'F') return viewRef.current?.fit();
      if (k === '1') return viewRef.current?.view('001');
      if (k === '2') return viewRef.current?.view('100');
      if (k === '3') return viewRef.current?.view('110');
      if (readOnly) return;
      if (mod && (k === 'z' || k === 'Z')) {
        e.preventDefault();
        return e.shiftKey ? redo() : undo();
      }
      if (mod && (k === 'y' || k === 'Y')) {
        e.preventDefault();
        return redo();
      }
      if (mod) return;
      if (k === 'v' || k === 'V') return setTool('select');
      if (k === 'p' || k === 'P') return setTool('place');
      if (k === 'm' || k === 'M') return setTool('move');
      if (k === 'Delete' || k === 'Backspace') return store.getState().deleteSites(store.getState().selection);
      if (k === '[') return setLayerK((l) => l - 1);
      if (k === ']') return setLayerK((l) => l + 1);
      const arrows: Record<string, [0 | 1 | 2, 1 | -1]> = { ArrowRight: [0, 1], ArrowLeft: [0, -1], ArrowUp: [1, 1], ArrowDown: [1, -1], PageUp: [2, 1], PageDown: [2, -1] };
      if (arrows[k]) {
        e.preventDefault();
        nudge(...arrows[k]);
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [store, readOnly, undo, redo, nudge]);

  const reloadTheirs = async () => {
    setBusy(true);
    try {
      const fresh = await fetchDesign(projectId, designId);
      qc.setQueryData(designQuery(projectId, designId).queryKey, fresh);
      store.getState().load(fresh.document);
      autosave.resetTo(fresh.version, fresh.updatedAt);
    } finally {
      setBusy(false);
    }
  };
  const keepMine = async () => {
    setBusy(true);
    try {
      const current = store.getState().document;
      const name = `${current.name} (my copy)`.slice(0, 200);
      const created = await createDesign(projectId, { name, document: { ...current, name } });
      navigate(`/projects/${projectId}/designs/${created.id}`);
    } finally {
      setBusy(false);
    }
  };

  const tools: { id: Tool; label: string; key: string }[] = [
    { id: 'select', label: 'Select', key: 'V' },
    { id: 'place', label: 'Place donor', key: 'P' },
    { id: 'move', label: 'Move', key: 'M' },
  ];
  const layerZ = (layerK * a) / 4;
  const selectedCount = selection.length;
  const sitesTotal = useMemo(() => doc.sites.length, [doc.sites]);

  return (
    <div className="flex min-h-0 flex-1 flex-col overflow-y-auto bg-wafer-100">
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1 border-b border-wafer-200 bg-white px-4 py-2">
        <nav aria-label="Breadcrumb" className="text-note">
          <Link to={`/projects/${projectId}`} className="font-semibold text-phosphor-700 hover:underline">
            {projectName}
          </Link>
          <span aria-hidden="true" className="mx-1.5 text-wafer-400">/</span>
        </nav>
        {readOnly ? (
          <h1 className="text-lead font-bold">{doc.name}</h1>
        ) : (
          <>
            <h1 className="sr-only">{doc.name}</h1>
            <input
              aria-label="Design name"
              key={doc.name}
              defaultValue={doc.name}
              onBlur={(e) => {
                const v = e.target.value.trim();
                if (v && v !== doc.name) store.getState().rename(v.slice(0, 200));
              }}
              onKeyDown={(e) => {
                if (e.key === 'Enter') e.currentTarget.blur();
              }}
              className="min-w-0 rounded border border-transparent px-1 text-lead font-bold hover:border-wafer-300"
            />
          </>
        )}
        <span className="num text-fine text-wafer-600">
          {sitesTotal.toLocaleString('en-US')} site{sitesTotal === 1 ? '' : 's'}
          {selectedCount > 0 && `, ${selectedCount.toLocaleString('en-US')} selected`}
        </span>
        <SaveBadge state={autosave.state} dirty={autosave.dirty} readOnly={readOnly} />
        <div className="ml-auto flex flex-wrap items-center gap-1.5">
          {!readOnly && (
            <>
              <Button variant="secondary" onClick={undo} disabled={history.past === 0} aria-keyshortcuts="Control+Z">
                Undo
              </Button>
              <Button variant="secondary" onClick={redo} disabled={history.future === 0} aria-keyshortcuts="Control+Shift+Z">
                Redo
              </Button>
              <Button variant="secondary" onClick={() => void autosave.saveNow()} disabled={!autosave.dirty || autosave.state.kind === 'stale'}>
                Save now
              </Button>
            </>
          )}
          <details className="relative">
            <summary className="cursor-pointer rounded-md border border-wafer-300 bg-white px-3 py-1.5 text-note font-semibold text-wafer-800">Download</summary>
            <ul aria-label="Downloads" className="absolute right-0 z-20 mt-1 w-72 space-y-1 rounded-md border border-wafer-200 bg-white p-2 text-note shadow-lg">
              {EXPORT_FORMATS.map((f) => (
                <li key={f}>
                  <a href={exportHref(projectId, designId, f)} download className="text-phosphor-700 hover:underline">
                    {EXPORT_LABELS[f]}
                  </a>
                </li>
              ))}
              <li className="text-fine text-wafer-500">Downloads hold the last saved version.</li>
            </ul>
          </details>
          <Button variant="quiet" onClick={() => setHelp((h) => !h)} aria-expanded={help}>
            Shortcuts (?)
          </Button>
        </div>
      </div>
      {autosave.state.kind === 'stale' && <StaleChoice state={autosave.state} busy={busy} onReload={() => void reloadTheirs()} onCopy={() => void keepMine()} />}
      {help && (
        <section aria-label="Keyboard shortcuts" className="border-b border-wafer-200 bg-white px-4 py-2">
          <dl className="grid grid-cols-1 gap-x-6 gap-y-0.5 text-note md:grid-cols-2">
            {SHORTCUTS.map(([key, what]) => (
              <div key={key} className="flex gap-2">
                <dt className="w-44 shrink-0 font-mono font-semibold">{key}</dt>
                <dd className="text-wafer-700">{what}</dd>
              </div>
            ))}
          </dl>
        </section>
      )}

      <div className="grid grid-cols-1 gap-2 p-2 lg:h-[calc(100vh-7.5rem)] lg:shrink-0 lg:grid-cols-[17rem_minmax(0,1fr)_24rem] lg:grid-rows-[minmax(0,3fr)_minmax(0,2fr)]">
        {!readOnly ? (
          <aside aria-label="Build" className="order-2 space-y-3 overflow-y-auto rounded-md border border-wafer-200 bg-white p-3 lg:order-1 lg:row-span-2 lg:min-h-0">
            <section aria-label="Tools" className="space-y-1.5">
              <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Tools</h2>
              <div role="radiogroup" aria-label="Tool" className="flex flex-wrap gap-1">
                {tools.map((t) => (
                  <button
                    key={t.id}
                    type="button"
                    role="radio"
                    aria-checked={tool === t.id}
                    aria-keyshortcuts={t.key}
                    onClick={() => setTool(t.id)}
                    className={`rounded-md px-2.5 py-1 text-note font-semibold ${tool === t.id ? 'bg-phosphor-700 text-white' : 'bg-wafer-100 text-wafer-800 hover:bg-wafer-200'}`}
                  >
                    {t.label} <span className="font-mono text-fine opacity-70">{t.key}</span>
                  </button>
                ))}
              </div>
              <Button variant="danger" disabled={selectedCount === 0} onClick={() => store.getState().deleteSites(selection)}>
                Delete selected{selectedCount > 0 ? ` (${selectedCount})` : ''}
              </Button>
              <div className="grid grid-cols-2 gap-1.5">
                <div>
                  <label htmlFor="place-species" className="block text-fine font-semibold text-wafer-700">Species to place</label>
                  <select id="place-species" value={species} onChange={(e) => setSpecies(e.target.value as Species)} className="w-full rounded border border-wafer-300 bg-white px-1 py-1 text-note">
                    {SPECIES_ORDER.map((sp) => (
                      <option key={sp} value={sp}>{SPECIES_STYLE[sp].label}</option>
                    ))}
                  </select>
                </div>
                <div>
                  <label htmlFor="layer-k" className="block text-fine font-semibold text-wafer-700">
                    Active layer <span className="font-normal text-wafer-500">(k, a/4)</span>
                  </label>
                  <input id="layer-k" type="number" step={1} value={layerK} onChange={(e) => Number.isInteger(Number(e.target.value)) && setLayerK(Number(e.target.value))} className="num w-full rounded border border-wafer-300 px-1.5 py-1 text-note" />
                </div>
              </div>
              <p className="num text-fine text-wafer-600">Layer plane z = {layerZ.toFixed(3)} nm (the (001) layer the place tool snaps to).</p>
            </section>
            <section aria-label="Array builder section" className="space-y-1.5 border-t border-wafer-100 pt-2">
              <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Build an array</h2>
              <GeneratorForm />
            </section>
            <section className="space-y-1.5 border-t border-wafer-100 pt-2">
              <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Import</h2>
              <ImportPanel projectId={projectId} designId={designId} />
            </section>
          </aside>
        ) : (
          <aside aria-label="About this view" className="order-2 rounded-md border border-wafer-200 bg-white p-3 text-note text-wafer-700 lg:order-1 lg:row-span-2">
            <p>You are a viewer of this project: everything here is read-only. Downloads are under “Download”.</p>
          </aside>
        )}

        <div className="order-1 flex min-w-0 flex-col gap-2 lg:order-2 lg:min-h-0">
          <div className="relative h-[58vh] min-h-[420px] lg:h-full lg:min-h-0">
            <Suspense fallback={<Loading label="Loading the 3D canvas…" />}>
              <DesignCanvas
                document={shown}
                selection={selection}
                tool={readOnly ? 'select' : tool}
                readOnly={readOnly}
                report={farField.report}
                placeSpecies={species}
                layerK={layerK}
                viewRef={viewRef}
                onSelect={(ids, how) => store.getState().select(ids, how)}
                onPlace={(sp, pos) => {
                  const hit = store.getState().document.sites.find((s) => Math.hypot(s.position[0] - pos[0], s.position[1] - pos[1], s.position[2] - pos[2]) < 1e-6);
                  if (hit) store.getState().select([hit.id]);
                  else store.getState().placeSite(sp, pos);
                }}
                onPreview={setPreview}
                onCommitDomain={(h) => store.getState().setDomain({ ...store.getState().document.domain, halfExtentsNm: h })}
                onCommitMove={(pos) => store.getState().moveSites(pos)}
              />
            </Suspense>
            <ViewButtons viewRef={viewRef} />
          </div>
        </div>

        <div className="order-4 flex min-w-0 flex-col lg:col-start-2 lg:row-start-2 lg:min-h-0">
          <div className="h-80 lg:h-auto lg:min-h-0 lg:flex-1">
            <SiteTable readOnly={readOnly} />
          </div>
          <p className="mt-1 text-fine text-wafer-600">
            Positions and distances are geometry (nm); lattice indices count a/4 steps with a = {a} nm. Orbitals marked “species preset” use the model defaults; double-click a cell (or Enter) to edit it.
          </p>
        </div>

        <aside aria-label="Checks and settings" className="order-3 space-y-3 overflow-y-auto rounded-md border border-wafer-200 bg-white p-3 lg:col-start-3 lg:row-span-2 lg:row-start-1 lg:min-h-0">
          <FarFieldPanel
            report={farField.report}
            computing={farField.computing}
            error={farField.error}
            elementsPending={farField.elementsPending}
            document={shown}
            readOnly={readOnly}
            onApplyRecommended={(h) => store.getState().setDomain({ ...store.getState().document.domain, halfExtentsNm: h })}
          />
          <div className="border-t border-wafer-100 pt-2">
            <DomainBoxForm readOnly={readOnly} />
          </div>
          <div className="border-t border-wafer-100 pt-2">
            <LayerStackForm readOnly={readOnly} />
          </div>
          <div className="border-t border-wafer-100 pt-2">
            <ElectrodesForm readOnly={readOnly} />
          </div>
          <div className="border-t border-wafer-100 pt-2">
            <Assumptions />
          </div>
        </aside>
      </div>

      {/* below the editing grid, one scroll away: runs on the server and their results */}
      <div className="min-w-0 p-2 pt-0">
        <RunsSection projectId={projectId} designId={designId} canRun={canRun} unsaved={autosave.dirty || autosave.state.kind === 'saving' || autosave.state.kind === 'pending'} document={doc} />
      </div>
    </div>
  );
}
