/**
 * The array builder: a chain, grid or honeycomb flake of donors (each array site optionally a
 * cluster of 2–4 donors) from geometry/arrays, optionally one member of the seeded placement-
 * disorder ensemble. Replaces or adds to the current sites as one undoable edit.
 */
import { useState, type FormEvent } from 'react';
import { Button } from '../../components/Button';
import { useEditorStore } from './editorContext';
import { ARRAY_KIND_LABELS, ARRAY_KINDS, GENERATOR_DEFAULTS, generatorFormSchema, runGenerator, type GeneratorFormInput } from './generatorSchema';

type Key = keyof GeneratorFormInput;

export function GeneratorForm() {
  const store = useEditorStore();
  const [values, setValues] = useState(GENERATOR_DEFAULTS);
  const [errors, setErrors] = useState<Partial<Record<Key, string>>>({});
  const [message, setMessage] = useState<string | null>(null);
  const set = (k: Key, v: string) => setValues((o) => ({ ...o, [k]: v }));

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = generatorFormSchema.safeParse(values);
    if (!parsed.success) {
      const errs: Partial<Record<Key, string>> = {};
      for (const iss of parsed.error.issues) errs[(iss.path[0] as Key) ?? 'kind'] ??= iss.message;
      setErrors(errs);
      setMessage(null);
      return;
    }
    setErrors({});
    const doc = store.getState().document;
    try {
      const sites = runGenerator(parsed.data, doc.host.latticeConstantNm, doc.domain.center);
      store.getState().putSites(sites, parsed.data.mode);
      setMessage(`${parsed.data.mode === 'replace' ? 'Placed' : 'Added'} ${sites.length} sites.`);
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
    }
  };

  const field = (k: Key, label: string, unit?: string, hint?: string) => (
    <div className="min-w-0">
      <label htmlFor={`gen-${k}`} className="block text-fine font-semibold text-wafer-700">
        {label} {unit && <span className="font-normal text-wafer-500">({unit})</span>}
      </label>
      <input
        id={`gen-${k}`}
        inputMode="decimal"
        value={values[k]}
        onChange={(e) => set(k, e.target.value)}
        aria-invalid={errors[k] ? true : undefined}
        aria-describedby={errors[k] ? `gen-${k}-error` : hint ? `gen-${k}-hint` : undefined}
        className={`num w-full rounded border px-1.5 py-1 text-note ${errors[k] ? 'border-garnet-600' : 'border-wafer-300'}`}
      />
      {hint && !errors[k] && <p id={`gen-${k}-hint`} className="text-fine text-wafer-500">{hint}</p>}
      {errors[k] && <p id={`gen-${k}-error`} className="text-fine text-garnet-700">{errors[k]}</p>}
    </div>
  );
  const select = (k: Key, label: string, options: [string, string][]) => (
    <div className="min-w-0">
      <label htmlFor={`gen-${k}`} className="block text-fine font-semibold text-wafer-700">{label}</label>
      <select id={`gen-${k}`} value={values[k]} onChange={(e) => set(k, e.target.value)} className="w-full rounded border border-wafer-300 bg-white px-1 py-1 text-note">
        {options.map(([v, l]) => (
          <option key={v} value={v}>{l}</option>
        ))}
      </select>
    </div>
  );
  const unitLabel = values.spacingUnit === 'a' ? 'lattice constants' : 'nm';

  return (
    <form aria-label="Array builder" onSubmit={submit} noValidate className="space-y-2">
      {select('kind', 'Array shape', ARRAY_KINDS.map((k) => [k, ARRAY_KIND_LABELS[k]]))}
      <div className="grid grid-cols-2 gap-1.5">
        {field('nx', values.kind === 'chain' ? 'Sites' : 'Cells along x', 'count')}
        {values.kind !== 'chain' && field('ny', 'Cells along y', 'count')}
        {field('spacing', 'Spacing', unitLabel)}
        {select('spacingUnit', 'Spacing unit', [['a', 'lattice constants a'], ['nm', 'nm']])}
        {values.kind === 'rectangular' && field('spacingY', 'Spacing along y', unitLabel)}
        {field('angleDeg', 'Turn about [001]', '°')}
        {field('planeZNm', 'Donor plane z', 'nm')}
        {select('clusterSize', 'Donors per array site', [['1', '1 (single donor)'], ['2', '2 (pair cluster)'], ['3', '3'], ['4', '4']])}
        {select('species', 'Species', [['P', 'P (donor)'], ['As', 'As (donor)'], ['Sb', 'Sb (donor)'], ['Bi', 'Bi (donor)'], ['B', 'B (acceptor)']])}
        {field('electrons', 'Electrons per site', '0–2')}
      </div>
      <fieldset className="grid grid-cols-3 gap-1.5 rounded border border-wafer-200 p-1.5">
        <legend className="px-1 text-fine text-wafer-600">Placement disorder (seeded)</legend>
        {field('disorderRadiusNm', 'Radius', 'nm', '0 keeps nominal sites')}
        {field('seed', 'Seed', 'integer')}
        {field('sample', 'Sample', 'no.')}
      </fieldset>
      {select('mode', 'Current sites', [['replace', 'Replace them'], ['add', 'Keep them and add']])}
      <Button type="submit">Build array</Button>
      <p role="status" className="text-fine text-wafer-600">{message}</p>
    </form>
  );
}
