/**
 * The mesh of a revision in 3D: the elements cut by a movable plane, coloured by refinement level, element size
 * (longest edge, nm), shape quality (mean ratio), smallest dihedral angle or, after a solve, the potential (V), with a
 * colour bar that names the quantity and its unit; the dihedral-angle and quality histograms; and element size
 * against the distance to the nearest site (log axes). Loaded lazily with the workspace's three.js chunk.
 */
import { useMemo, useState } from 'react';
import { Canvas } from '@react-three/fiber';
import { OrbitControls } from '@react-three/drei';
import { CartesianGrid, ResponsiveContainer, Scatter, ScatterChart, Tooltip, XAxis, YAxis } from 'recharts';
import * as THREE from 'three';
import { computeTetQuality } from '../../../../geometry/mesh/quality';
import type { TetMesh } from '../../../../geometry/mesh/types';
import { Loading } from '../../components/QueryState';
import { cutElements, rampCss } from './cutElements';
import { useMeshBytes } from './meshBytes';
import { decodePotential, elementMean, histogram, range, sizeAgainstDistance } from './meshFields';
import { usePotentialBytes } from './potentialBytes';

type ColourBy = 'level' | 'size' | 'quality' | 'dihedral' | 'potential';
const AXES = ['x', 'y', 'z'] as const;
type Vec3 = readonly [number, number, number];

/** what each colouring shows: the label in the picker, the colour bar's title (quantity and unit) */
const COLOUR_LABEL: Record<ColourBy, { option: string; bar: string }> = {
  level: { option: 'refinement level', bar: 'Refinement level (bisection generation, no unit)' },
  size: { option: 'element size (nm)', bar: 'Element size: longest edge (nm), log scale' },
  quality: { option: 'shape quality (mean ratio)', bar: 'Shape quality: mean ratio (no unit; 1 = regular tetrahedron)' },
  dihedral: { option: 'smallest dihedral angle (°)', bar: 'Smallest dihedral angle (degrees)' },
  potential: { option: 'potential (V)', bar: 'Potential of the sites’ charges (V), element mean' },
};

const fmt = (v: number) => (Math.abs(v) >= 100 || v === 0 ? v.toFixed(0) : Math.abs(v) >= 1 ? v.toFixed(2) : v.toPrecision(3));
/** an axis tick: at most 3 significant digits, no trailing zeros */
const tick = (v: number) => String(+v.toPrecision(3));
/** powers of ten from lo to hi (a log axis' ticks) */
const decadeTicks = ([lo, hi]: [number, number]) => {
  const out: number[] = [];
  for (let k = Math.round(Math.log10(lo)); k <= Math.round(Math.log10(hi)); k++) out.push(10 ** k);
  return out;
};

function Histogram({ label, caption, series, lo, hi, unit }: { label: string; caption: string; series: { name: string; counts: number[]; className: string }[]; lo: number; hi: number; unit: string }) {
  const bins = series[0].counts.length;
  const max = Math.max(1, ...series.flatMap((s) => s.counts));
  const w = (hi - lo) / bins;
  return (
    <figure aria-label={label} className="space-y-0.5">
      <figcaption className="text-note font-semibold">{caption}</figcaption>
      <div className="flex h-24 items-end gap-px border-b border-l border-wafer-300">
        {Array.from({ length: bins }, (_, k) => (
          <div key={k} className="flex h-full flex-1 items-end gap-px">
            {series.map((s) => (
              <div key={s.name} title={`${s.name}, ${tick(lo + k * w)}–${tick(lo + (k + 1) * w)}${unit}: ${s.counts[k]} elements`} className={`flex-1 ${s.className}`} style={{ height: `${(100 * s.counts[k]) / max}%` }} />
            ))}
          </div>
        ))}
      </div>
      <div className="num flex justify-between text-fine text-wafer-600">
        <span>{tick(lo)}{unit}</span>
        <span>{tick((lo + hi) / 2)}{unit}</span>
        <span>{tick(hi)}{unit}</span>
      </div>
      <p className="text-fine text-wafer-600">
        Bar height: number of elements (tallest bar {max.toLocaleString('en-US')}).{' '}
        {series.length > 1 &&
          series.map((s) => (
            <span key={s.name} className="mr-2 inline-flex items-center gap-1">
              <span aria-hidden="true" className={`inline-block h-2 w-3 ${s.className}`} />
              {s.name}
            </span>
          ))}
      </p>
    </figure>
  );
}

function SizeDistancePlot({ points }: { points: { distanceNm: number; sizeNm: number }[] }) {
  // log axes need positive values: a centroid on a site (distance 0) is drawn at 0.001 nm
  const data = points.map((p) => ({ d: Math.max(1e-3, p.distanceNm), h: p.sizeNm }));
  const dec = (vs: number[]): [number, number] => [10 ** Math.floor(Math.log10(Math.min(...vs))), 10 ** Math.ceil(Math.log10(Math.max(...vs)))];
  const xDomain = dec(data.map((p) => p.d)), yDomain = dec(data.map((p) => p.h));
  return (
    <figure aria-label="Element size against distance to the nearest site" className="space-y-0.5">
      <figcaption className="text-note font-semibold">Element size (longest edge, nm) against distance from its centre to the nearest site (nm), log-log</figcaption>
      <div className="h-56">
        <ResponsiveContainer width="100%" height="100%">
          <ScatterChart margin={{ top: 8, right: 16, bottom: 24, left: 24 }}>
            <CartesianGrid stroke="#e5e7eb" />
            <XAxis dataKey="d" type="number" scale="log" domain={xDomain} ticks={decadeTicks(xDomain)} allowDataOverflow tickFormatter={tick} label={{ value: 'distance to nearest site (nm)', position: 'insideBottom', offset: -12 }} />
            <YAxis dataKey="h" type="number" scale="log" domain={yDomain} ticks={decadeTicks(yDomain)} allowDataOverflow tickFormatter={tick} label={{ value: 'size (nm)', angle: -90, position: 'insideLeft', offset: -8 }} />
            <Tooltip formatter={(v) => `${fmt(Number(v))} nm`} />
            <Scatter name="elements" data={data} fill="#0f766e" isAnimationActive={false} />
          </ScatterChart>
        </ResponsiveContainer>
      </div>
      <p className="text-fine text-wafer-600">{points.length.toLocaleString('en-US')} elements drawn (an even sample when there are more). The mesh is graded: small elements near the sites, larger towards the walls.</p>
    </figure>
  );
}

function Viewer({ mesh, sites, potential }: { mesh: TetMesh; sites: Vec3[] | null; potential: Float64Array | null }) {
  const [axis, setAxis] = useState(0);
  const [colourBy, setColourBy] = useState<ColourBy>(potential ? 'potential' : 'level');
  const bounds = useMemo(() => {
    const lo = [Infinity, Infinity, Infinity], hi = [-Infinity, -Infinity, -Infinity];
    for (let i = 0; i < mesh.coords.length; i++) {
      const k = i % 3;
      if (mesh.coords[i] < lo[k]) lo[k] = mesh.coords[i];
      if (mesh.coords[i] > hi[k]) hi[k] = mesh.coords[i];
    }
    return { lo, hi };
  }, [mesh]);
  const [cut, setCut] = useState(0);
  const quality = useMemo(() => computeTetQuality(mesh), [mesh]);
  const fields = useMemo(() => {
    const level = Float64Array.from(mesh.tetLevel);
    const logSize = quality.longestEdge.map(Math.log10);
    const pot = potential ? elementMean(mesh, potential) : null;
    return {
      level: { value: level, range: range(level) },
      size: { value: logSize, range: range(logSize) },
      quality: { value: quality.meanRatio, range: [0, 1] as [number, number] },
      dihedral: { value: quality.minDihedralDeg, range: [0, 70.53] as [number, number] }, // arccos(1/3) = 70.53°, the regular tetrahedron's
      potential: pot ? { value: pot, range: range(pot) } : null,
    };
  }, [mesh, quality, potential]);
  const field = fields[colourBy] ?? fields.level;
  const [lo, hi] = field.range;
  const { geometry, count } = useMemo(() => {
    const c = cutElements(mesh, axis, cut, field.value, lo, hi);
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.BufferAttribute(c.positions, 3));
    g.setAttribute('color', new THREE.BufferAttribute(c.colours, 3));
    g.computeVertexNormals();
    return { geometry: g, count: c.count };
  }, [mesh, axis, cut, field, lo, hi]);
  const dihedral = useMemo(() => ({ min: histogram(quality.minDihedralDeg, 0, 180, 36), max: histogram(quality.maxDihedralDeg, 0, 180, 36) }), [quality]);
  const meanRatio = useMemo(() => histogram(quality.meanRatio, 0, 1, 20), [quality]);
  const sizePoints = useMemo(() => (sites ? sizeAgainstDistance(mesh, quality.longestEdge, sites) : null), [mesh, quality, sites]);
  const span = Math.max(bounds.hi[0] - bounds.lo[0], bounds.hi[1] - bounds.lo[1], bounds.hi[2] - bounds.lo[2]);
  const step = span / 200;
  const barLabel = (v: number) => (colourBy === 'level' ? `level ${v}` : colourBy === 'size' ? `${fmt(10 ** v)} nm` : colourBy === 'quality' ? fmt(v) : colourBy === 'dihedral' ? `${v.toFixed(1)}°` : `${fmt(v)} V`);

  return (
    <div className="space-y-3">
      <div className="grid grid-cols-1 gap-3 md:grid-cols-[minmax(0,1fr)_16rem]">
        <div className="space-y-1">
          <div className="relative h-80 rounded border border-wafer-200 bg-wafer-50" aria-label="Mesh view" role="img">
            <Canvas frameloop="demand" camera={{ position: [span * 0.9, span * 0.7, span * 0.9], near: span / 1000, far: span * 10 }}>
              <ambientLight intensity={0.6} />
              <directionalLight position={[1, 2, 3]} intensity={1.2} />
              <mesh geometry={geometry}>
                <meshLambertMaterial vertexColors side={THREE.DoubleSide} />
              </mesh>
              <OrbitControls makeDefault />
            </Canvas>
          </div>
          <p className="num text-fine text-wafer-600">
            {count.toLocaleString('en-US')} of {(mesh.tets.length / 4).toLocaleString('en-US')} tetrahedra cut by the plane {AXES[axis]} = {cut.toFixed(2)} nm. Drag to turn, wheel to zoom.
          </p>
        </div>
        <div className="space-y-2 text-note">
          <fieldset className="space-y-1">
            <legend className="font-semibold">Cutting plane</legend>
            <label className="block">
              Normal along{' '}
              <select aria-label="Plane normal" value={axis} onChange={(e) => setAxis(Number(e.target.value))} className="rounded border border-wafer-300 px-1">
                {AXES.map((a, k) => (
                  <option key={a} value={k}>{a}</option>
                ))}
              </select>
            </label>
            <label className="block">
              Position (nm)
              <input aria-label="Plane position (nm)" type="range" min={bounds.lo[axis]} max={bounds.hi[axis]} step={step} value={cut} onChange={(e) => setCut(Number(e.target.value))} className="w-full" />
            </label>
          </fieldset>
          <label className="block">
            Colour by{' '}
            <select aria-label="Colour by" value={colourBy} onChange={(e) => setColourBy(e.target.value as ColourBy)} className="rounded border border-wafer-300 px-1">
              {(Object.keys(COLOUR_LABEL) as ColourBy[])
                .filter((k) => k !== 'potential' || fields.potential)
                .map((k) => (
                  <option key={k} value={k}>{COLOUR_LABEL[k].option}</option>
                ))}
            </select>
          </label>
          {!fields.potential && <p className="text-fine text-wafer-600">The potential can be shown for the mesh of a U and V solve.</p>}
          <figure aria-label="Colour bar" role="img" className="space-y-0.5">
            <figcaption className="text-fine font-semibold">{COLOUR_LABEL[colourBy].bar}</figcaption>
            <div className="h-3 rounded" style={{ background: rampCss }} />
            <div className="num flex justify-between text-fine text-wafer-600">
              <span>{barLabel(lo)}</span>
              <span>{barLabel((lo + hi) / 2)}</span>
              <span>{barLabel(hi)}</span>
            </div>
          </figure>
          {colourBy === 'potential' && (
            <p className="text-fine text-wafer-600">Sum over the sites of the potential of each site’s model density taken as a charge of +e, in a homogeneous host; on the design’s graded mesh. A model estimate.</p>
          )}
          <p className="num text-fine text-wafer-600">
            All elements: dihedral angles {range(quality.minDihedralDeg)[0].toFixed(1)}° to {range(quality.maxDihedralDeg)[1].toFixed(1)}°, mean ratio {range(quality.meanRatio)[0].toFixed(3)} to {range(quality.meanRatio)[1].toFixed(3)}, sizes {fmt(range(quality.longestEdge)[0])} nm to {fmt(range(quality.longestEdge)[1])} nm.
          </p>
        </div>
      </div>
      <div className="grid grid-cols-1 gap-3 md:grid-cols-3">
        <Histogram
          label="Dihedral angle histogram"
          caption="Smallest and largest dihedral angle per element (degrees)"
          series={[
            { name: 'smallest angle', counts: dihedral.min, className: 'bg-phosphor-600' },
            { name: 'largest angle', counts: dihedral.max, className: 'bg-ember-400' },
          ]}
          lo={0}
          hi={180}
          unit="°"
        />
        <Histogram label="Quality histogram" caption="Shape quality per element: mean ratio (no unit; 1 = regular)" series={[{ name: 'mean ratio', counts: meanRatio, className: 'bg-phosphor-600' }]} lo={0} hi={1} unit="" />
        {sizePoints ? sizePoints.length > 0 ? <SizeDistancePlot points={sizePoints} /> : <p className="text-fine text-wafer-600">The design has no sites: no distances to plot.</p> : <Loading label="Reading the sites…" />}
      </div>
    </div>
  );
}

export default function MeshViewer({ projectId, revisionId, sites, withPotential = false }: { projectId: number; revisionId: number; sites: Vec3[] | null; withPotential?: boolean }) {
  const q = useMeshBytes(projectId, revisionId);
  const p = usePotentialBytes(projectId, revisionId, withPotential);
  const potential = useMemo(() => {
    if (!q.data || !p.data) return null;
    try {
      return decodePotential(p.data, q.data.coords.length / 3);
    } catch {
      return null;
    }
  }, [q.data, p.data]);
  if (q.isPending || (withPotential && p.isPending)) return <Loading label="Loading the mesh…" />;
  if (q.isError) return <p role="alert" className="text-note text-garnet-700">The mesh could not be shown: {q.error.message}</p>;
  return (
    <>
      {withPotential && !potential && <p role="alert" className="text-note text-garnet-700">The potential of this solve could not be read{p.error ? `: ${p.error.message}` : ' (it does not fit the mesh)'}; the mesh is shown without it.</p>}
      <Viewer key={potential ? 'with-potential' : 'plain'} mesh={q.data} sites={sites} potential={potential} />
    </>
  );
}
