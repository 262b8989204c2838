/**
 * The two convergence sweeps drawn with recharts: the refinement sweep as |ΔU| against unknowns on log-log axes with
 * the fitted rate, the box sweep as U against the box half-width for grounded and multipole walls with error bars.
 */
import { CartesianGrid, ComposedChart, ErrorBar, Legend, Line, LineChart, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from 'recharts';
import { EstimateNote } from '../../components/EstimateNote';
import { meV, type ConvergenceSummary } from './summaries';

const COLOURS = ['#0f766e', '#b45309', '#6d28d9', '#be123c'];

/** decades that hold every value, for a log axis (recharts needs a domain without zero) */
function decades(values: number[]): [number, number] {
  const pos = values.filter((v) => v > 0 && Number.isFinite(v));
  if (pos.length === 0) return [1, 10];
  return [10 ** Math.floor(Math.log10(Math.min(...pos))), 10 ** Math.ceil(Math.log10(Math.max(...pos)))];
}

/** the powers of ten of a decades domain, as a log axis' ticks */
function decadeTicks([lo, hi]: [number, number]): number[] {
  const out: number[] = [];
  for (let k = Math.round(Math.log10(lo)); k <= Math.round(Math.log10(hi)); k++) out.push(10 ** k);
  return out;
}
/** 10⁴ as 10,000 and 10⁻³ as 0.001: plain numbers on the axes */
const plain = (v: number) => (v >= 1 ? v.toLocaleString('en-US') : String(+v.toPrecision(1)));

const sig = (v: number) => (Math.abs(v) >= 100 ? v.toFixed(0) : v.toPrecision(3));

function RefinementPlot({ s }: { s: Extract<ConvergenceSummary, { kind: 'refinement' }> }) {
  const fit = s.fittedRate;
  // the fitted line through the measured points: |ΔU| ≈ C N^(−rate), C from the geometric means (least squares in log-log)
  const pts = s.rows.filter((r) => r.deltaEv !== null && r.deltaEv > 0).map((r) => ({ dofs: r.dofs, delta: meV(r.deltaEv!) }));
  let c = 0;
  if (fit !== null && pts.length > 0) c = Math.exp(pts.reduce((acc, p) => acc + Math.log(p.delta) + fit * Math.log(p.dofs), 0) / pts.length);
  const data = pts.map((p) => ({ ...p, fit: fit !== null ? c * p.dofs ** -fit : undefined }));
  const x = decades(data.map((d) => d.dofs));
  const y = decades([...data.map((d) => d.delta), ...data.flatMap((d) => (d.fit ? [d.fit] : []))]);
  return (
    <figure aria-label="Refinement sweep plot" className="space-y-1">
      <figcaption className="text-note font-semibold">
        Change in U of site {s.siteIds[0]} between levels against unknowns (log-log). Fitted rate: |ΔU| ∝ N<sup>−{fit === null ? '?' : fit.toFixed(2)}</sup>; theory on graded meshes: N<sup>−{s.theoreticalRate.toFixed(2)}</sup>.{' '}
        <span className="font-normal text-wafer-600">(least squares in log-log through {data.length} point{data.length === 1 ? '' : 's'}{data.length === 2 ? ': two points fix the line, so the fit has no spread to judge it by' : ''})</span>
      </figcaption>
      {data.length < 2 && <p className="text-fine text-garnet-700">Fewer than two levels changed U measurably: no rate can be fitted.</p>}
      <div className="h-64">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} margin={{ top: 8, right: 16, bottom: 24, left: 16 }}>
            <CartesianGrid stroke="#e5e7eb" />
            <XAxis dataKey="dofs" type="number" scale="log" domain={x} ticks={decadeTicks(x)} allowDataOverflow tickFormatter={plain} label={{ value: 'unknowns N (degrees of freedom)', position: 'insideBottom', offset: -12 }} />
            <YAxis type="number" scale="log" domain={y} ticks={decadeTicks(y)} allowDataOverflow tickFormatter={plain} label={{ value: '|ΔU| (meV)', angle: -90, position: 'insideLeft' }} />
            <Tooltip formatter={(v) => `${sig(Number(v))} meV`} labelFormatter={(v) => `N = ${Number(v).toLocaleString('en-US')}`} />
            <Legend verticalAlign="top" />
            <Scatter name="|ΔU| measured (meV)" dataKey="delta" fill={COLOURS[0]} isAnimationActive={false} />
            {fit !== null && <Line name={`fit N^−${fit.toFixed(2)}`} dataKey="fit" stroke={COLOURS[1]} dot={false} strokeDasharray="5 3" isAnimationActive={false} />}
          </ComposedChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

function BoxPlot({ s }: { s: Extract<ConvergenceSummary, { kind: 'box' }> }) {
  const boundaries = [...new Set(s.rows.map((r) => r.boundary))];
  const series = boundaries.map((b) => ({
    name: b,
    data: s.rows.filter((r) => r.boundary === b).map((r) => ({ half: r.halfWidthNm, u: meV(r.uEv[0]), err: meV(r.uErrorEv[0]) })),
  }));
  return (
    <figure aria-label="Box sweep plot" className="space-y-1">
      <figcaption className="text-note font-semibold">U of site {s.siteIds[0]} (meV) against the box half-width (nm), one line per wall condition; bars are the solver’s error estimates.</figcaption>
      <div className="h-64">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart margin={{ top: 8, right: 16, bottom: 24, left: 16 }}>
            <CartesianGrid stroke="#e5e7eb" />
            <XAxis dataKey="half" type="number" domain={['auto', 'auto']} label={{ value: 'box half-width (nm)', position: 'insideBottom', offset: -12 }} />
            <YAxis type="number" domain={['auto', 'auto']} tickFormatter={(v: number) => v.toFixed(1)} label={{ value: 'U (meV)', angle: -90, position: 'insideLeft' }} />
            <Tooltip formatter={(v) => `${Number(v).toFixed(2)} meV`} labelFormatter={(v) => `half-width ${Number(v).toFixed(2)} nm`} />
            <Legend verticalAlign="top" />
            {series.map((ser, k) => (
              <Line key={ser.name} name={ser.name === 'grounded' ? 'grounded walls' : `${ser.name} walls`} data={ser.data} dataKey="u" stroke={COLOURS[k % COLOURS.length]} isAnimationActive={false}>
                <ErrorBar dataKey="err" width={4} stroke={COLOURS[k % COLOURS.length]} direction="y" />
              </Line>
            ))}
          </LineChart>
        </ResponsiveContainer>
      </div>
    </figure>
  );
}

export function ConvergenceResults({ summary }: { summary: ConvergenceSummary }) {
  return (
    <div className="space-y-2">
      {summary.kind === 'refinement' ? <RefinementPlot s={summary} /> : <BoxPlot s={summary} />}
      <p className="text-fine text-wafer-600">P{summary.order} elements. Energies in meV (1 eV = 1000 meV).</p>
      {summary.notes.length > 0 && (
        <ul className="list-disc pl-4 text-fine text-wafer-700">
          {summary.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      )}
      <EstimateNote assumptions="A sweep shows how U moves with the mesh or the box, for this model: it says how far the numbers are from converged, not how close the model is to the device." />
    </div>
  );
}
