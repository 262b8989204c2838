/**
 * Two revisions side by side: the design version and content hash they came from, the options, and, for two U and V
 * results, U per site and V per pair with the difference (meV).
 */
import { Loading } from '../../components/QueryState';
import { useRevision } from './getRevision';
import { coulombSummarySchema, KIND_LABEL, meV, optionsText } from './summaries';

export function CompareRevisions({ projectId, ids }: { projectId: number; ids: [number, number] }) {
  const a = useRevision(projectId, ids[0]);
  const b = useRevision(projectId, ids[1]);
  if (a.isPending || b.isPending) return <Loading label="Reading both revisions…" />;
  if (a.isError || b.isError) return <p role="alert" className="text-note text-garnet-700">Could not read both revisions: {(a.error ?? b.error)?.message}</p>;
  const ra = a.data, rb = b.data;
  const rows: [string, string, string][] = [
    ['What', KIND_LABEL[ra.kind], KIND_LABEL[rb.kind]],
    ['Design version', String(ra.designVersion), String(rb.designVersion)],
    ['Design content (sha256, first 12)', ra.designSha256.slice(0, 12), rb.designSha256.slice(0, 12)],
    ['Options', optionsText(ra.kind, ra.options) || 'defaults', optionsText(rb.kind, rb.options) || 'defaults'],
    ['Software', ra.software.version, rb.software.version],
  ];
  const ca = coulombSummarySchema.safeParse(ra.summary), cb = coulombSummarySchema.safeParse(rb.summary);
  if (ca.success && cb.success) {
    const ub = new Map(cb.data.sites.map((s) => [s.id, s]));
    for (const s of ca.data.sites) {
      const o = ub.get(s.id);
      rows.push([`U ${s.id} (meV)`, `${meV(s.uEv).toFixed(2)} ± ${meV(s.uErrorEv).toFixed(3)}`, o ? `${meV(o.uEv).toFixed(2)} ± ${meV(o.uErrorEv).toFixed(3)} (Δ ${meV(o.uEv - s.uEv).toFixed(2)})` : 'not in this revision']);
    }
    const vb = new Map(cb.data.pairs.map((p) => [`${p.a}–${p.b}`, p]));
    for (const p of ca.data.pairs) {
      const o = vb.get(`${p.a}–${p.b}`);
      rows.push([`V ${p.a}–${p.b} (meV)`, `${meV(p.vEv).toFixed(2)} ± ${meV(p.vErrorEv).toFixed(3)}`, o ? `${meV(o.vEv).toFixed(2)} ± ${meV(o.vErrorEv).toFixed(3)} (Δ ${meV(o.vEv - p.vEv).toFixed(2)})` : 'not in this revision']);
    }
  }
  return (
    <table aria-label={`Revision ${ra.id} beside revision ${rb.id}`} className="num w-full text-note">
      <thead>
        <tr className="border-b border-wafer-200 text-left">
          <th className="px-1.5 py-1" />
          <th className="px-1.5 py-1">Revision {ra.id}</th>
          <th className="px-1.5 py-1">Revision {rb.id}</th>
        </tr>
      </thead>
      <tbody>
        {rows.map(([k, x, y]) => (
          <tr key={k} className={`border-b border-wafer-100 ${x !== y && !k.startsWith('U ') && !k.startsWith('V ') ? 'bg-ember-50' : ''}`}>
            <th scope="row" className="px-1.5 py-0.5 text-left font-semibold">{k}</th>
            <td className="px-1.5 py-0.5">{x}</td>
            <td className="px-1.5 py-0.5">{y}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
