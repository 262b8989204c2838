/**
 * Domain box and refinement settings beside the canvas: centre and half-extents (nm), the
 * boundary kind and its multipole order, the element order, target relative error and element
 * budget. Checked with the design document's own schema; each field says its unit. Applying is one
 * undoable edit. The form remounts (keyed by the values) when the document changes elsewhere.
 */
import { useState, type FormEvent } from 'react';
import { z } from 'zod';
import { designSchema } from '@contracts/design';
import { Button } from '../../components/Button';
import { useEditor, useEditorStore } from './editorContext';

const domainSchema = designSchema.shape.domain;
const refinementSchema = designSchema.shape.refinement;

type Values = Record<'cx' | 'cy' | 'cz' | 'hx' | 'hy' | 'hz' | 'kind' | 'mpOrder' | 'order' | 'target' | 'budget', string>;

function toNumber(s: string): number {
  return s.trim() === '' ? NaN : Number(s);
}

const FIELD_OF_PATH: Record<string, keyof Values> = {
  'center.0': 'cx', 'center.1': 'cy', 'center.2': 'cz',
  'halfExtentsNm.0': 'hx', 'halfExtentsNm.1': 'hy', 'halfExtentsNm.2': 'hz',
  'boundary.order': 'mpOrder', order: 'order', targetRelError: 'target', maxElements: 'budget',
};

/** Parse the form; returns the domain and refinement or a message per field. */
export function parseDomainForm(v: Values): { ok: true; domain: z.infer<typeof domainSchema>; refinement: z.infer<typeof refinementSchema> } | { ok: false; errors: Partial<Record<keyof Values, string>> } {
  const errors: Partial<Record<keyof Values, string>> = {};
  const enc = domainSchema.safeParse({
    center: [toNumber(v.cx), toNumber(v.cy), toNumber(v.cz)],
    halfExtentsNm: [toNumber(v.hx), toNumber(v.hy), toNumber(v.hz)],
    boundary: v.kind === 'grounded' ? { kind: 'grounded' } : { kind: 'multipole', order: toNumber(v.mpOrder) },
  });
  const ref = refinementSchema.safeParse({ order: toNumber(v.order), targetRelError: toNumber(v.target), maxElements: toNumber(v.budget) });
  const say: Record<keyof Values, string> = {
    cx: 'Centre x is a number of nm.', cy: 'Centre y is a number of nm.', cz: 'Centre z is a number of nm.',
    hx: 'Half-extent x is a positive number of nm.', hy: 'Half-extent y is a positive number of nm.', hz: 'Half-extent z is a positive number of nm.',
    kind: 'Pick a boundary kind.', mpOrder: 'Multipole order is a whole number from 0 to 4.', order: 'Element order is 1 or 2.',
    target: 'Target error is a fraction between 0 and 1 (e.g. 0.01 for 1 %).', budget: 'Element budget is a whole number from 1 to 1,000,000,000.',
  };
  for (const iss of [...(enc.success ? [] : enc.error.issues), ...(ref.success ? [] : ref.error.issues)]) {
    const f = FIELD_OF_PATH[iss.path.join('.')] ?? 'kind';
    errors[f] ??= say[f];
  }
  if (!enc.success || !ref.success) return { ok: false, errors };
  return { ok: true, domain: enc.data, refinement: ref.data };
}

function Num({ name, label, unit, values, errors, set, readOnly }: { name: keyof Values; label: string; unit: string; values: Values; errors: Partial<Record<keyof Values, string>>; set: (k: keyof Values, v: string) => void; readOnly: boolean }) {
  const id = `domain-${name}`;
  return (
    <div className="min-w-0">
      <label htmlFor={id} className="block text-fine font-semibold text-wafer-700">
        {label} <span className="font-normal text-wafer-500">({unit})</span>
      </label>
      <input
        id={id}
        name={name}
        inputMode="decimal"
        readOnly={readOnly}
        value={values[name]}
        aria-invalid={errors[name] ? true : undefined}
        aria-describedby={errors[name] ? `${id}-error` : undefined}
        onChange={(e) => set(name, e.target.value)}
        className={`num w-full rounded border px-1.5 py-1 text-note ${errors[name] ? 'border-garnet-600' : 'border-wafer-300'} ${readOnly ? 'bg-wafer-50' : 'bg-white'}`}
      />
      {errors[name] && (
        <p id={`${id}-error`} className="text-fine text-garnet-700">
          {errors[name]}
        </p>
      )}
    </div>
  );
}

export function DomainBoxForm({ readOnly }: { readOnly: boolean }) {
  const domain = useEditor((s) => s.document.domain);
  const refinement = useEditor((s) => s.document.refinement);
  // remount with fresh values whenever the document's box or settings change (undo, drag, apply)
  return <DomainBoxFormBody key={JSON.stringify([domain, refinement])} readOnly={readOnly} />;
}

function DomainBoxFormBody({ readOnly }: { readOnly: boolean }) {
  const store = useEditorStore();
  const [values, setValues] = useState<Values>(() => {
    const { domain: e, refinement: r } = store.getState().document;
    return {
      cx: String(e.center[0]), cy: String(e.center[1]), cz: String(e.center[2]),
      hx: String(e.halfExtentsNm[0]), hy: String(e.halfExtentsNm[1]), hz: String(e.halfExtentsNm[2]),
      kind: e.boundary.kind, mpOrder: String(e.boundary.kind === 'multipole' ? e.boundary.order : 2),
      order: String(r.order), target: String(r.targetRelError), budget: String(r.maxElements),
    };
  });
  const [errors, setErrors] = useState<Partial<Record<keyof Values, string>>>({});
  const set = (k: keyof Values, v: string) => setValues((old) => ({ ...old, [k]: v }));

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = parseDomainForm(values);
    if (!parsed.ok) return setErrors(parsed.errors);
    setErrors({});
    const st = store.getState();
    const doc = st.document;
    // one edit for both parts, so a single undo restores the box and the settings together
    if (JSON.stringify(parsed.domain) !== JSON.stringify(doc.domain) || JSON.stringify(parsed.refinement) !== JSON.stringify(doc.refinement))
      store.setState({ document: { ...doc, domain: parsed.domain, refinement: parsed.refinement } });
  };
  const common = { values, errors, set, readOnly };
  return (
    <form aria-label="Domain box and refinement" onSubmit={submit} noValidate className="space-y-2">
      <fieldset className="space-y-1">
        <legend className="text-fine font-bold uppercase tracking-wider text-wafer-500">Domain box</legend>
        <div className="grid grid-cols-3 gap-1.5">
          <Num name="cx" label="Centre x" unit="nm" {...common} />
          <Num name="cy" label="Centre y" unit="nm" {...common} />
          <Num name="cz" label="Centre z" unit="nm" {...common} />
          <Num name="hx" label="Half-extent x" unit="nm" {...common} />
          <Num name="hy" label="Half-extent y" unit="nm" {...common} />
          <Num name="hz" label="Half-extent z" unit="nm" {...common} />
        </div>
        <div className="grid grid-cols-2 gap-1.5">
          <div>
            <label htmlFor="domain-kind" className="block text-fine font-semibold text-wafer-700">Boundary</label>
            <select id="domain-kind" disabled={readOnly} value={values.kind} onChange={(e) => set('kind', e.target.value)} className="w-full rounded border border-wafer-300 bg-white px-1 py-1 text-note">
              <option value="grounded">Grounded walls (potential 0)</option>
              <option value="multipole">Multipole expansion on the walls</option>
            </select>
          </div>
          {values.kind === 'multipole' && <Num name="mpOrder" label="Multipole order" unit="0–4" {...common} />}
        </div>
      </fieldset>
      <fieldset className="space-y-1">
        <legend className="text-fine font-bold uppercase tracking-wider text-wafer-500">Refinement</legend>
        <div className="grid grid-cols-3 gap-1.5">
          <div>
            <label htmlFor="domain-order" className="block text-fine font-semibold text-wafer-700">Element order</label>
            <select id="domain-order" disabled={readOnly} value={values.order} onChange={(e) => set('order', e.target.value)} className="w-full rounded border border-wafer-300 bg-white px-1 py-1 text-note">
              <option value="1">P1 (linear)</option>
              <option value="2">P2 (quadratic)</option>
            </select>
          </div>
          <Num name="target" label="Target error" unit="fraction" {...common} />
          <Num name="budget" label="Element budget" unit="elements" {...common} />
        </div>
      </fieldset>
      {!readOnly && (
        <Button type="submit" variant="secondary">
          Apply box and settings
        </Button>
      )}
    </form>
  );
}
