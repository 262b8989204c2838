/**
 * The host stack form ("Host stack"): planar layers along [001], listed from the top of the
 * stack down as they sit in the device (the document stores them bottom to top). Each layer has
 * a name, εr and its z span in nm; an empty bound of the lowest or highest layer is unbounded.
 * Structure edits (preset, add, remove, move a material) are one undoable edit each; typed
 * values are applied together with "Apply stack", checked first with the design contract, whose
 * messages show at their fields. The form remounts (keyed by the stack) when undo changes it.
 */
import { useState, type FormEvent } from 'react';
import { Button } from '../../../components/Button';
import { useEditor, useEditorStore } from '../editorContext';
import type { Layer } from '../editorStore';
import { addLayerOnTop, checkEdit, layerToText, moveLayerMaterial, oxidePreset, presetSurfaceNm, PRESET_OXIDE_NM, removeLayer, textToLayer, withLayers, type EditIssues, type LayerText } from './deviceEdit';
import { EditIssueList, NumField } from './fields';

export function LayerStackForm({ readOnly }: { readOnly: boolean }) {
  const layers = useEditor((s) => s.document.host.layers);
  const epsilonR = useEditor((s) => s.document.host.epsilonR);
  if (readOnly) return <LayerStackView layers={layers} epsilonR={epsilonR} />;
  return <LayerStackBody key={JSON.stringify(layers ?? null)} />;
}

function fmtZ(z: number | null, end: 'below' | 'above'): string {
  return z === null ? (end === 'below' ? '−∞ (unbounded)' : '+∞ (unbounded)') : `${z} nm`;
}

/** What a viewer sees: the stack as text, no controls. */
function LayerStackView({ layers, epsilonR }: { layers: readonly Layer[] | undefined; epsilonR: number }) {
  return (
    <section aria-label="Host stack" className="space-y-1">
      <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Host stack</h2>
      {!layers ? (
        <p className="text-fine text-wafer-700">One material everywhere: silicon, εr {epsilonR}.</p>
      ) : (
        <ol aria-label="Layers, top first" className="space-y-0.5 text-fine text-wafer-800">
          {[...layers].reverse().map((l) => (
            <li key={l.name} className="num">
              <span className="font-semibold">{l.name}</span>: εr {l.epsilonR}, z from {fmtZ(l.zMinNm, 'below')} to {fmtZ(l.zMaxNm, 'above')}
            </li>
          ))}
        </ol>
      )}
    </section>
  );
}

function LayerStackBody() {
  const store = useEditorStore();
  const [rows, setRows] = useState<LayerText[]>(() => (store.getState().document.host.layers ?? []).map(layerToText));
  const [issues, setIssues] = useState<EditIssues | null>(null);
  const [surface, setSurface] = useState(() => String(presetSurfaceNm(store.getState().document)));
  const [presetError, setPresetError] = useState<string | null>(null);
  const doc = () => store.getState().document;

  /** Commit a layer list as one edit if the contract accepts it; else show its messages. */
  const commit = (layers: Layer[]): boolean => {
    const before = doc();
    const found = checkEdit(before, withLayers(before, layers), 'layers');
    if (!found.ok) {
      setRows(layers.map(layerToText));
      setIssues(found);
      return false;
    }
    setIssues(null);
    store.getState().setLayers(layers);
    return true;
  };
  const current = (): Layer[] => rows.map(textToLayer);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    commit(current());
  };
  const applyPreset = () => {
    const z = Number(surface.trim().replace('−', '-'));
    if (surface.trim() === '' || !Number.isFinite(z)) return setPresetError('The silicon surface is a number of nm.');
    setPresetError(null);
    commit(oxidePreset(z));
  };
  const set = (k: number, field: keyof LayerText, v: string) => setRows((old) => old.map((r, i) => (i === k ? { ...r, [field]: v } : r)));
  const f = issues?.fields ?? {};
  const n = rows.length;

  return (
    <form aria-label="Host stack" onSubmit={submit} noValidate className="space-y-2">
      <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Host stack</h2>
      <p className="text-fine text-wafer-600">
        Planar layers along [001], each with its own εr. Without layers the host is silicon (εr from the design) everywhere. Leave a bound of the lowest or highest layer empty for unbounded.
      </p>
      <div className="space-y-1 rounded border border-wafer-200 p-2">
        <p className="text-fine font-semibold text-wafer-700">Ready-made stack: silicon under {PRESET_OXIDE_NM} nm of oxide, vacuum above</p>
        <div className="flex items-end gap-1.5">
          <div className="min-w-0 flex-1">
            <label htmlFor="preset-surface" className="block text-fine text-wafer-700">
              Silicon surface at z <span className="text-wafer-500">(nm)</span>
            </label>
            <input
              id="preset-surface"
              inputMode="decimal"
              value={surface}
              onChange={(e) => setSurface(e.target.value)}
              aria-invalid={presetError ? true : undefined}
              aria-describedby={presetError ? 'preset-surface-error' : undefined}
              className="num w-full rounded border border-wafer-300 bg-white px-1.5 py-1 text-note"
            />
          </div>
          <Button type="button" variant="secondary" onClick={applyPreset}>
            Use oxide stack
          </Button>
        </div>
        {presetError && (
          <p id="preset-surface-error" className="text-fine text-garnet-700">
            {presetError}
          </p>
        )}
        <p className="text-fine text-wafer-500">εr 11.7 (silicon), 3.9 (oxide), 1 (vacuum): handbook values.</p>
      </div>
      {n > 0 && (
        <ol aria-label="Layers, top first" className="space-y-1.5">
          {rows
            .map((r, k) => ({ r, k }))
            .reverse()
            .map(({ r, k }) => {
              const at = (field: string) => f[`host.layers.${k}.${field}`];
              return (
                <li key={k} aria-label={`Layer ${r.name || k + 1}`} className="rounded border border-wafer-200 p-1.5">
                  <div className="grid grid-cols-[minmax(0,1.6fr)_minmax(0,1fr)] gap-1.5">
                    <NumField id={`layer-${k}-name`} label="Name" value={r.name} error={at('name')} onChange={(v) => set(k, 'name', v)} text />
                    <NumField id={`layer-${k}-eps`} label="εr" unit="relative" value={r.epsilonR} error={at('epsilonR')} onChange={(v) => set(k, 'epsilonR', v)} />
                    <NumField id={`layer-${k}-zmin`} label="z from" unit="nm" placeholder={k === 0 ? 'unbounded' : undefined} value={r.zMinNm} error={at('zMinNm')} onChange={(v) => set(k, 'zMinNm', v)} />
                    <NumField id={`layer-${k}-zmax`} label="z to" unit="nm" placeholder={k === n - 1 ? 'unbounded' : undefined} value={r.zMaxNm} error={at('zMaxNm')} onChange={(v) => set(k, 'zMaxNm', v)} />
                  </div>
                  <div className="mt-1 flex flex-wrap gap-1">
                    <Button type="button" variant="quiet" disabled={k === n - 1} onClick={() => commit(moveLayerMaterial(current(), k, 1))} aria-label={`Move ${r.name || 'this material'} up (the z bounds stay)`}>
                      Up
                    </Button>
                    <Button type="button" variant="quiet" disabled={k === 0} onClick={() => commit(moveLayerMaterial(current(), k, -1))} aria-label={`Move ${r.name || 'this material'} down (the z bounds stay)`}>
                      Down
                    </Button>
                    <Button type="button" variant="quiet" onClick={() => commit(removeLayer(current(), k))} aria-label={`Remove layer ${r.name || k + 1}`}>
                      Remove
                    </Button>
                  </div>
                </li>
              );
            })}
        </ol>
      )}
      <EditIssueList issues={issues} refused="The stack was not applied" />
      <div className="flex flex-wrap gap-1.5">
        <Button type="button" variant="secondary" onClick={() => commit(addLayerOnTop(current(), doc()))}>
          {n === 0 ? 'Add a layer' : 'Add layer on top'}
        </Button>
        {n > 0 && <Button type="submit">Apply stack</Button>}
        {n > 0 && (
          <Button type="button" variant="quiet" onClick={() => commit([])}>
            Remove all layers
          </Button>
        )}
      </div>
    </form>
  );
}

