/**
 * The mesh of a revision in 3D: the elements cut by a movable plane, coloured by refinement level or by shape
 * (smallest dihedral angle), with a colour bar, and the histogram of the smallest dihedral angle per element.
 * Loaded lazily with the workspace's three.js chunk.
 */
import { useMemo, useState } from 'react';
import { Canvas } from '@react-three/fiber';
import { OrbitControls } from '@react-three/drei';
import * as THREE from 'three';
import { computeTetQuality } from '../../../../geometry/mesh/quality';
import type { TetMesh } from '../../../../geometry/mesh/types';
import { Loading } from '../../components/QueryState';
import { cutElements, rampCss } from './cutElements';
import { useMeshBytes } from './meshBytes';

type ColourBy = 'level' | 'dihedral';
const AXES = ['x', 'y', 'z'] as const;

function Viewer({ mesh }: { mesh: TetMesh }) {
  const [axis, setAxis] = useState(0);
  const [colourBy, setColourBy] = useState<ColourBy>('level');
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
  const level = useMemo(() => Float64Array.from(mesh.tetLevel), [mesh]);
  const levelRange = useMemo(() => [Math.min(...mesh.tetLevel), Math.max(...mesh.tetLevel)] as const, [mesh]);
  const value = colourBy === 'level' ? level : quality.minDihedralDeg;
  const [lo, hi] = colourBy === 'level' ? levelRange : [0, 70.53]; // 70.53° = the regular tetrahedron's dihedral angle, arccos(1/3)
  const { geometry, count } = useMemo(() => {
    const c = cutElements(mesh, axis, cut, value, lo, hi);
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.BufferAttribute(c.positions, 3));
    g.setAttribute('color', new THREE.BufferAttribute(c.colours, 3));
    g.computeVertexNormals();
    return { geometry: g, count: c.count };
  }, [mesh, axis, cut, value, lo, hi]);
  const hist = useMemo(() => {
    const bins = new Array<number>(18).fill(0); // 5° bins over 0–90°
    for (const d of quality.minDihedralDeg) bins[Math.min(17, Math.floor(d / 5))]++;
    return bins;
  }, [quality]);
  const maxBin = Math.max(1, ...hist);
  const span = Math.max(bounds.hi[0] - bounds.lo[0], bounds.hi[1] - bounds.lo[1], bounds.hi[2] - bounds.lo[2]);
  const step = span / 200;

  return (
    <div className="grid grid-cols-1 gap-3 md:grid-cols-[minmax(0,1fr)_16rem]">
      <div className="space-y-1">
        <div className="relative h-80 rounded bg-wafer-900" aria-label="Mesh view" role="img">
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
            <option value="level">refinement level</option>
            <option value="dihedral">smallest dihedral angle</option>
          </select>
        </label>
        <div aria-label="Colour bar" role="img">
          <div className="h-3 rounded" style={{ background: rampCss }} />
          <div className="num flex justify-between text-fine text-wafer-600">
            <span>{colourBy === 'level' ? `level ${lo}` : `${lo}°`}</span>
            <span>{colourBy === 'level' ? `level ${hi} (finest)` : `${hi.toFixed(1)}° (regular)`}</span>
          </div>
        </div>
        <figure aria-label="Smallest dihedral angle histogram">
          <figcaption className="font-semibold">Smallest dihedral angle per element (degrees)</figcaption>
          <div className="flex h-24 items-end gap-px border-b border-wafer-300">
            {hist.map((c, k) => (
              <div key={k} title={`${k * 5}–${k * 5 + 5}°: ${c} elements`} className="flex-1 bg-phosphor-600" style={{ height: `${(100 * c) / maxBin}%` }} />
            ))}
          </div>
          <div className="num flex justify-between text-fine text-wafer-600">
            <span>0°</span>
            <span>45°</span>
            <span>90°</span>
          </div>
          <p className="num text-fine text-wafer-600">
            All elements: {Math.min(...quality.minDihedralDeg).toFixed(1)}° to {Math.max(...quality.maxDihedralDeg).toFixed(1)}°.
          </p>
        </figure>
      </div>
    </div>
  );
}

export default function MeshViewer({ projectId, revisionId }: { projectId: number; revisionId: number }) {
  const q = useMeshBytes(projectId, revisionId);
  if (q.isPending) return <Loading label="Loading the mesh…" />;
  if (q.isError) return <p role="alert" className="text-note text-garnet-700">The mesh could not be shown: {q.error.message}</p>;
  return <Viewer mesh={q.data} />;
}
