/**
 * V drawn on the bond graph: the sites as points in the plane in which they spread most, each computed pair as a
 * line coloured by V (meV, with a colour bar) and, when there are few, labelled with its value and error bar.
 */
import { rampCss, ramp } from './cutElements';
import { layoutSites } from './bondLayout';
import { meV, type CoulombSummary } from './summaries';

const W = 560, H = 320, PAD = 36;
const AXIS = ['x', 'y', 'z'] as const;

export function BondGraph({ summary, sites }: { summary: CoulombSummary; sites: { id: string; position: readonly [number, number, number] }[] }) {
  const shown = sites.filter((s) => summary.sites.some((u) => u.id === s.id) || summary.pairs.some((p) => p.a === s.id || p.b === s.id));
  if (shown.length === 0 || summary.pairs.length === 0) return <p className="text-fine text-wafer-600">No pairs to draw on the bond graph.</p>;
  const { axes, points, pxPerNm } = layoutSites(shown, W, H, PAD);
  const at = new Map(points.map((p) => [p.id, p]));
  const vs = summary.pairs.map((p) => meV(p.vEv));
  const lo = Math.min(...vs), hi = Math.max(...vs);
  const colour = (v: number) => `rgb(${ramp(hi > lo ? (v - lo) / (hi - lo) : 1).map((c) => Math.round(c * 255)).join(',')})`;
  const labelled = summary.pairs.length <= 24;
  // a 1 nm scale bar (or 10 nm when 1 nm is under 20 px)
  const scaleNm = pxPerNm >= 20 ? 1 : pxPerNm >= 2 ? 10 : 100;
  return (
    <figure aria-label="V on the bond graph" className="space-y-1">
      <figcaption className="text-note font-semibold">
        V per pair on the bond graph (meV): sites seen along {AXIS[3 - axes[0] - axes[1]]}, in the {AXIS[axes[0]]}–{AXIS[axes[1]]} plane (nm)
      </figcaption>
      <svg viewBox={`0 0 ${W} ${H}`} className="w-full max-w-2xl rounded border border-wafer-200 bg-white" role="img" aria-label={`${summary.pairs.length} pairs between ${shown.length} sites`}>
        {summary.pairs.map((p) => {
          const a = at.get(p.a), b = at.get(p.b);
          if (!a || !b) return null;
          const v = meV(p.vEv);
          return (
            <g key={`${p.a}-${p.b}`}>
              <line x1={a.x} y1={a.y} x2={b.x} y2={b.y} stroke={colour(v)} strokeWidth={4} strokeLinecap="round">
                <title>{`V ${p.a}–${p.b}: ${v.toFixed(2)} ± ${meV(p.vErrorEv).toFixed(3)} meV at ${p.distanceNm.toFixed(3)} nm`}</title>
              </line>
              {labelled && (
                <text x={(a.x + b.x) / 2} y={(a.y + b.y) / 2 - 6} textAnchor="middle" className="fill-wafer-800 text-[11px]">
                  {v.toFixed(1)} ± {meV(p.vErrorEv).toFixed(1)} meV
                </text>
              )}
            </g>
          );
        })}
        {points.map((p) => (
          <g key={p.id}>
            <circle cx={p.x} cy={p.y} r={5} className="fill-wafer-900" />
            <text x={p.x} y={p.y + 16} textAnchor="middle" className="fill-wafer-700 text-[11px]">{p.id}</text>
          </g>
        ))}
        <line x1={PAD} y1={H - 12} x2={PAD + scaleNm * pxPerNm} y2={H - 12} stroke="#334155" strokeWidth={2} />
        <text x={PAD} y={H - 16} className="fill-wafer-700 text-[10px]">{scaleNm} nm</text>
      </svg>
      <div aria-label="Colour scale of V" role="img" className="max-w-2xl space-y-0.5">
        <div className="h-3 rounded" style={{ background: rampCss }} />
        {hi - lo > 0.005 ? (
          <div className="num flex justify-between text-fine text-wafer-600">
            <span>V {lo.toFixed(2)} meV</span>
            <span>{((lo + hi) / 2).toFixed(2)} meV</span>
            <span>{hi.toFixed(2)} meV</span>
          </div>
        ) : (
          <p className="num text-fine text-wafer-600">{summary.pairs.length === 1 ? 'One pair' : 'Every pair'}: V = {hi.toFixed(2)} meV (the colour of the right end).</p>
        )}
      </div>
      <p className="text-fine text-wafer-600">Positions are the design’s, projected onto the plane; a line is a pair the solve computed.{labelled ? '' : ' Hover a line for its value.'}</p>
    </figure>
  );
}
