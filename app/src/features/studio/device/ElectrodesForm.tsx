/**
 * The electrodes form ("Metal electrodes"): boxes of metal at a set voltage, each with a name,
 * its low and high corner (nm) and its voltage (V); a top or back plane spanning the domain's
 * x–y cross-section in one click; and what the domain walls are for the electrodes' problem
 * (`domain.electrodeWalls`). Typed values are applied with "Apply electrodes" after the design
 * contract accepts them (its messages show at the fields); each structural change is one undoable
 * edit. The form remounts (keyed by the electrodes) when undo changes them.
 */
import { useState, type FormEvent } from 'react';
import { Button } from '../../../components/Button';
import { useEditor, useEditorStore } from '../editorContext';
import type { Electrode, ElectrodeWalls } from '../editorStore';
import { checkEdit, domainCorners, electrodeToText, gateBox, planeElectrode, spansCrossSection, textToElectrode, withElectrodes, type EditIssues, type ElectrodeText } from './deviceEdit';
import { EditIssueList, NumField } from './fields';

export const WALLS_SAY: Record<ElectrodeWalls, { label: string; meaning: string }> = {
  grounded: {
    label: 'Grounded walls (0 V)',
    meaning: 'The domain walls are held at 0 V, like a far-away grounded enclosure: pick it when the box is large against the gates.',
  },
  'zero-normal-field': {
    label: 'No field through the walls',
    meaning: 'No field line crosses the domain walls (zero normal field), as if the device repeated as a mirror image beyond them: pick it when gates run on past the box.',
  },
};

export const LEAD_NOTE = 'A heavily doped in-plane lead is modelled as a metal box: its whole volume is held at its voltage.';

const fmtV = (v: number) => `${v > 0 ? '+' : v < 0 ? '−' : ''}${Math.abs(v)} V`;
const fmtCorner = (p: readonly number[]) => `(${p.map((x) => String(x)).join(', ')}) nm`;

export function ElectrodesForm({ readOnly }: { readOnly: boolean }) {
  const electrodes = useEditor((s) => s.document.electrodes);
  const walls = useEditor((s) => s.document.domain.electrodeWalls ?? 'grounded');
  if (readOnly) return <ElectrodesView electrodes={electrodes} walls={walls} />;
  return <ElectrodesBody key={JSON.stringify(electrodes ?? null)} walls={walls} />;
}

function ElectrodesView({ electrodes, walls }: { electrodes: readonly Electrode[] | undefined; walls: ElectrodeWalls }) {
  return (
    <section aria-label="Metal electrodes" className="space-y-1">
      <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Metal electrodes</h2>
      {!electrodes ? (
        <p className="text-fine text-wafer-700">No electrodes.</p>
      ) : (
        <>
          <ul aria-label="Electrodes" className="space-y-0.5 text-fine text-wafer-800">
            {electrodes.map((e) => (
              <li key={e.name} className="num">
                <span className="font-semibold">{e.name}</span> at {fmtV(e.voltageV)}: from {fmtCorner(e.minNm)} to {fmtCorner(e.maxNm)}
              </li>
            ))}
          </ul>
          <p className="text-fine text-wafer-700">
            Domain walls: {WALLS_SAY[walls].label}. {WALLS_SAY[walls].meaning}
          </p>
        </>
      )}
      <p className="text-fine text-wafer-600">{LEAD_NOTE}</p>
    </section>
  );
}

function ElectrodesBody({ walls }: { walls: ElectrodeWalls }) {
  const store = useEditorStore();
  const [rows, setRows] = useState<ElectrodeText[]>(() => (store.getState().document.electrodes ?? []).map(electrodeToText));
  const [issues, setIssues] = useState<EditIssues | null>(null);
  const doc = () => store.getState().document;
  const names = () => rows.map((r) => r.name);

  const commit = (electrodes: Electrode[]): boolean => {
    const before = doc();
    const found = checkEdit(before, withElectrodes(before, electrodes), 'electrodes');
    if (!found.ok) {
      setRows(electrodes.map(electrodeToText));
      setIssues(found);
      return false;
    }
    setIssues(null);
    store.getState().setElectrodes(electrodes);
    return true;
  };
  const current = (): Electrode[] => rows.map(textToElectrode);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    commit(current());
  };
  const setName = (k: number, v: string) => setRows((old) => old.map((r, i) => (i === k ? { ...r, name: v } : r)));
  const setVolt = (k: number, v: string) => setRows((old) => old.map((r, i) => (i === k ? { ...r, voltageV: v } : r)));
  const setCorner = (k: number, which: 'min' | 'max', a: number, v: string) =>
    setRows((old) =>
      old.map((r, i) => {
        if (i !== k) return r;
        const c = [...r[which]] as [string, string, string];
        c[a] = v;
        return { ...r, [which]: c };
      }),
    );
  /** stretch box k over the domain's x–y cross-section, keeping its z span */
  const span = (k: number) => {
    const { lo, hi } = domainCorners(doc());
    commit(current().map((e, i) => (i === k ? { ...e, minNm: [lo[0], lo[1], e.minNm[2]], maxNm: [hi[0], hi[1], e.maxNm[2]] } : e)));
  };
  const f = issues?.fields ?? {};
  const axes = ['x', 'y', 'z'] as const;

  return (
    <form aria-label="Metal electrodes" onSubmit={submit} noValidate className="space-y-2">
      <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Metal electrodes</h2>
      <p className="text-fine text-wafer-600">
        Boxes of metal held at a voltage (gates, leads), cut out of the domain. {LEAD_NOTE} A box spanning the domain’s whole x–y cross-section acts as a metal plane (a top or back gate).
      </p>
      {rows.length > 0 && (
        <ul aria-label="Electrodes" className="space-y-1.5">
          {rows.map((r, k) => {
            const at = (field: string) => f[`electrodes.${k}.${field}`];
            const parsed = textToElectrode(r);
            const plane = parsed.minNm.every(Number.isFinite) && parsed.maxNm.every(Number.isFinite) && spansCrossSection(parsed, doc());
            return (
              <li key={k} aria-label={`Electrode ${r.name || k + 1}`} className="rounded border border-wafer-200 p-1.5">
                <div className="grid grid-cols-[minmax(0,1.6fr)_minmax(0,1fr)] gap-1.5">
                  <NumField id={`electrode-${k}-name`} label="Name" value={r.name} error={at('name')} onChange={(v) => setName(k, v)} text />
                  <NumField id={`electrode-${k}-volt`} label="Voltage" unit="V" value={r.voltageV} error={at('voltageV')} onChange={(v) => setVolt(k, v)} />
                </div>
                <fieldset className="mt-1">
                  <legend className="text-fine text-wafer-600">Low corner (nm)</legend>
                  <div className="grid grid-cols-3 gap-1">
                    {axes.map((ax, a) => (
                      <NumField key={ax} id={`electrode-${k}-min-${ax}`} label={`${ax} from`} unit="nm" value={r.min[a]} error={at(`minNm.${a}`)} onChange={(v) => setCorner(k, 'min', a, v)} />
                    ))}
                  </div>
                </fieldset>
                <fieldset className="mt-1">
                  <legend className="text-fine text-wafer-600">High corner (nm)</legend>
                  <div className="grid grid-cols-3 gap-1">
                    {axes.map((ax, a) => (
                      <NumField key={ax} id={`electrode-${k}-max-${ax}`} label={`${ax} to`} unit="nm" value={r.max[a]} error={at(`maxNm.${a}`)} onChange={(v) => setCorner(k, 'max', a, v)} />
                    ))}
                  </div>
                </fieldset>
                <div className="mt-1 flex flex-wrap items-center gap-1">
                  {plane ? (
                    <span className="text-fine text-wafer-600">Spans the domain’s x–y: a metal plane.</span>
                  ) : (
                    <Button type="button" variant="quiet" onClick={() => span(k)} aria-label={`Stretch ${r.name || 'this electrode'} over the domain’s x–y cross-section`}>
                      Span x–y
                    </Button>
                  )}
                  <Button type="button" variant="quiet" onClick={() => commit(current().filter((_, i) => i !== k))} aria-label={`Remove electrode ${r.name || k + 1}`}>
                    Remove
                  </Button>
                </div>
              </li>
            );
          })}
        </ul>
      )}
      <EditIssueList issues={issues} refused="The electrodes were not applied" />
      <div className="flex flex-wrap gap-1.5">
        <Button type="button" variant="secondary" onClick={() => commit([...current(), planeElectrode(doc(), 'top', names())])}>
          Add top plane
        </Button>
        <Button type="button" variant="secondary" onClick={() => commit([...current(), planeElectrode(doc(), 'back', names())])}>
          Add back plane
        </Button>
        <Button type="button" variant="secondary" onClick={() => commit([...current(), gateBox(doc(), names())])}>
          Add gate box
        </Button>
        {rows.length > 0 && <Button type="submit">Apply electrodes</Button>}
      </div>
      <div>
        <label htmlFor="electrode-walls" className="block text-fine font-semibold text-wafer-700">
          Domain walls for the electrodes
        </label>
        <select
          id="electrode-walls"
          value={walls}
          onChange={(e) => store.getState().setElectrodeWalls(e.target.value as ElectrodeWalls)}
          aria-describedby="electrode-walls-meaning"
          className="w-full rounded border border-wafer-300 bg-white px-1 py-1 text-note"
        >
          {(Object.keys(WALLS_SAY) as ElectrodeWalls[]).map((w) => (
            <option key={w} value={w}>
              {WALLS_SAY[w].label}
            </option>
          ))}
        </select>
        <p id="electrode-walls-meaning" className="text-fine text-wafer-600">
          {WALLS_SAY[walls].meaning}
        </p>
      </div>
    </form>
  );
}
