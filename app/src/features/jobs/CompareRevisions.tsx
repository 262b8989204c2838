/**
 * Two revisions side by side: what changed in the design between the versions they came from (sites added, removed,
 * moved; box, host, refinement), the options they ran with, and the numbers: U per site and V per pair with the
 * difference (meV), or the mesh figures, or the fitted convergence rate.
 */
import type { Revision } from '@contracts/api';
import { EstimateNote } from '../../components/EstimateNote';
import { Loading } from '../../components/QueryState';
import { describeChanges, diffDesigns } from './designDiff';
import { useDesignVersion } from './getDesignVersion';
import { useRevision } from './getRevision';
import { coulombSummarySchema, convergenceSummarySchema, KIND_LABEL, meshSummarySchema, meV } from './summaries';

type Row = { key: string; a: string; b: string; diff?: string; differs: boolean };

const opt = (r: Revision) => ({
  order: r.options.order ? `P${r.options.order}` : 'design default',
  adaptive: r.kind === 'coulomb' ? (r.options.adaptive ? 'adaptive' : 'graded meshes') : '—',
  sweep: r.kind === 'convergence' ? (r.options.sweep === 'box' ? 'box sizes' : 'refinement levels') : '—',
});
const signed = (v: number, d: number) => `${v >= 0 ? '+' : '−'}${Math.abs(v).toLocaleString('en-US', { minimumFractionDigits: d, maximumFractionDigits: d })}`;

function numberRows(ra: Revision, rb: Revision): Row[] {
  const rows: Row[] = [];
  const ca = coulombSummarySchema.safeParse(ra.summary), cb = coulombSummarySchema.safeParse(rb.summary);
  if (ca.success && cb.success) {
    const ub = new Map(cb.data.sites.map((s) => [s.id, s]));
    const ids = new Set([...ca.data.sites.map((s) => s.id), ...cb.data.sites.map((s) => s.id)]);
    const ua = new Map(ca.data.sites.map((s) => [s.id, s]));
    for (const id of ids) {
      const x = ua.get(id), y = ub.get(id);
      rows.push({
        key: `U ${id} (meV)`,
        a: x ? `${meV(x.uEv).toFixed(2)} ± ${meV(x.uErrorEv).toFixed(3)} meV` : 'not in this revision',
        b: y ? `${meV(y.uEv).toFixed(2)} ± ${meV(y.uErrorEv).toFixed(3)} meV` : 'not in this revision',
        diff: x && y ? `${signed(meV(y.uEv - x.uEv), 3)} meV` : '—',
        differs: !x || !y || x.uEv !== y.uEv,
      });
    }
    const key = (p: { a: string; b: string }) => [p.a, p.b].sort().join('–');
    const va = new Map(ca.data.pairs.map((p) => [key(p), p])), vb = new Map(cb.data.pairs.map((p) => [key(p), p]));
    for (const k of new Set([...va.keys(), ...vb.keys()])) {
      const x = va.get(k), y = vb.get(k);
      rows.push({
        key: `V ${k} (meV)`,
        a: x ? `${meV(x.vEv).toFixed(2)} ± ${meV(x.vErrorEv).toFixed(3)} meV at ${x.distanceNm.toFixed(3)} nm` : 'not in this revision',
        b: y ? `${meV(y.vEv).toFixed(2)} ± ${meV(y.vErrorEv).toFixed(3)} meV at ${y.distanceNm.toFixed(3)} nm` : 'not in this revision',
        diff: x && y ? `${signed(meV(y.vEv - x.vEv), 3)} meV` : '—',
        differs: !x || !y || x.vEv !== y.vEv,
      });
    }
    rows.push({ key: 'Unknowns', a: ca.data.dofs.toLocaleString('en-US'), b: cb.data.dofs.toLocaleString('en-US'), diff: signed(cb.data.dofs - ca.data.dofs, 0), differs: ca.data.dofs !== cb.data.dofs });
  }
  const ma = meshSummarySchema.safeParse(ra.summary), mb = meshSummarySchema.safeParse(rb.summary);
  if (ra.kind === 'mesh' && rb.kind === 'mesh' && ma.success && mb.success) {
    for (const [k, label, d] of [['vertices', 'Vertices', 0], ['tets', 'Tetrahedra', 0], ['minDihedralDeg', 'Smallest dihedral angle (°)', 2], ['maxDihedralDeg', 'Largest dihedral angle (°)', 2], ['volumeNm3', 'Volume (nm³)', 3]] as const) {
      const x = ma.data[k], y = mb.data[k];
      const unit = k.endsWith('Deg') ? '°' : k === 'volumeNm3' ? ' nm³' : '';
      rows.push({ key: label, a: `${x.toLocaleString('en-US', { maximumFractionDigits: d })}${unit}`, b: `${y.toLocaleString('en-US', { maximumFractionDigits: d })}${unit}`, diff: `${signed(y - x, d)}${unit}`, differs: x !== y });
    }
  }
  const sa = convergenceSummarySchema.safeParse(ra.summary), sb = convergenceSummarySchema.safeParse(rb.summary);
  if (sa.success && sb.success && sa.data.kind === sb.data.kind) {
    const fa = sa.data.fittedRate, fb = sb.data.fittedRate;
    rows.push({ key: 'Fitted rate (no unit)', a: fa === null ? 'none' : fa.toFixed(3), b: fb === null ? 'none' : fb.toFixed(3), diff: fa !== null && fb !== null ? signed(fb - fa, 3) : '—', differs: fa !== fb });
  }
  return rows;
}

export function CompareRevisions({ projectId, ids }: { projectId: number; ids: [number, number] }) {
  // the older revision on the left, whatever order they were ticked in
  const [first, second] = ids[0] < ids[1] ? ids : [ids[1], ids[0]];
  const a = useRevision(projectId, first);
  const b = useRevision(projectId, second);
  if (a.isPending || b.isPending) return <Loading label="Reading both revisions…" />;
  if (a.isError || b.isError) return <p role="alert" className="text-note text-garnet-700">Could not read both revisions: {(a.error ?? b.error)?.message}</p>;
  return <Comparison projectId={projectId} ra={a.data} rb={b.data} />;
}

function Comparison({ projectId, ra, rb }: { projectId: number; ra: Revision; rb: Revision }) {
  const da = useDesignVersion(projectId, ra.designId, ra.designVersion);
  const db = useDesignVersion(projectId, rb.designId, rb.designVersion);
  const oa = opt(ra), ob = opt(rb);
  const head: Row[] = [
    { key: 'What', a: KIND_LABEL[ra.kind], b: KIND_LABEL[rb.kind], differs: ra.kind !== rb.kind },
    { key: 'Design version', a: String(ra.designVersion), b: String(rb.designVersion), differs: ra.designVersion !== rb.designVersion || ra.designId !== rb.designId },
    { key: 'Design content (sha256, first 12)', a: ra.designSha256.slice(0, 12), b: rb.designSha256.slice(0, 12), differs: ra.designSha256 !== rb.designSha256 },
    { key: 'Element order', a: oa.order, b: ob.order, differs: oa.order !== ob.order },
    { key: 'Meshes', a: oa.adaptive, b: ob.adaptive, differs: oa.adaptive !== ob.adaptive },
    { key: 'Sweep', a: oa.sweep, b: ob.sweep, differs: oa.sweep !== ob.sweep },
    { key: 'Software', a: `${ra.software.version}${ra.software.commit ? ` (${ra.software.commit.slice(0, 10)})` : ''}`, b: `${rb.software.version}${rb.software.commit ? ` (${rb.software.commit.slice(0, 10)})` : ''}`, differs: ra.software.version !== rb.software.version || ra.software.commit !== rb.software.commit },
  ];
  const numbers = numberRows(ra, rb);
  let changes: React.ReactNode;
  if (da.isPending || db.isPending) changes = <Loading label="Reading both design versions…" />;
  else if (da.isError || db.isError) changes = <p role="alert" className="text-note text-garnet-700">Could not read the design versions: {(da.error ?? db.error)?.message}</p>;
  else {
    const lines = describeChanges(diffDesigns(da.data.document, db.data.document));
    changes =
      lines.length === 0 ? (
        <p className="text-fine text-wafer-700">{ra.designSha256 === rb.designSha256 ? 'The same design content: nothing changed.' : 'Sites, box, host and refinement are the same (only the name or the order of the sites differs).'}</p>
      ) : (
        <ul aria-label="Design changes" className="list-disc pl-4 text-note">
          {lines.map((l) => (
            <li key={l}>{l}</li>
          ))}
        </ul>
      );
  }
  return (
    <section aria-label={`Revision ${ra.id} beside revision ${rb.id}`} className="space-y-2">
      <table aria-label={`Revision ${ra.id} beside revision ${rb.id}`} className="num w-full text-note">
        <thead>
          <tr className="border-b border-wafer-200 text-left">
            <th className="px-1.5 py-1" />
            <th className="px-1.5 py-1">Revision {ra.id}</th>
            <th className="px-1.5 py-1">Revision {rb.id}</th>
            <th className="px-1.5 py-1">Change ({rb.id} − {ra.id})</th>
          </tr>
        </thead>
        <tbody>
          {[...head, ...numbers].map((r) => (
            <tr key={r.key} className={`border-b border-wafer-100 ${r.differs ? 'bg-ember-50' : ''}`}>
              <th scope="row" className="px-1.5 py-0.5 text-left font-semibold">{r.key}</th>
              <td className="px-1.5 py-0.5">{r.a}</td>
              <td className="px-1.5 py-0.5">{r.b}</td>
              <td className="px-1.5 py-0.5">{r.diff ?? (r.differs ? 'differs' : 'same')}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="space-y-1">
        <h4 className="text-note font-semibold">What changed in the design (version {ra.designVersion} → {rb.designVersion})</h4>
        {changes}
      </div>
      {numbers.length > 0 && <EstimateNote assumptions="Differences between two model runs: each side carries its own error bar, and a difference smaller than the two bars together is not a measured change." />}
    </section>
  );
}
