/**
 * The design canvas (three.js through @react-three/fiber and drei), scene units nm, z along [001].
 *
 *  - sites: one InstancedMesh per species (one draw call each), our palette, per-species size;
 *  - domain box: translucent box + edges, six face handles in one InstancedMesh, dragged along
 *    their axis (the box stays centred; the far-field check follows the drag as a preview);
 *  - bond graph (geometry/arrays bondGraph) as line segments, length on hover;
 *  - far-field warnings: flagged sites ringed, flagged faces tinted;
 *  - the device (DeviceShapes.tsx): host layers as translucent slabs, electrodes as boxes, labelled;
 *  - tools: select (click, shift-click, drag a box), place a donor on the active (001) layer
 *    (snap dots near the pointer), move the selection with a handle that snaps to lattice sites;
 *  - views along [001], [100], [110], fit-to-view, a scale bar in nm, the crystal axes in a corner;
 *  - a light ground and our own species palette (palette.ts: CANVAS_THEME, SPECIES_STYLE);
 *  - `window.__tetrawellCanvasStats`: draw calls and triangles of the last frame (renderer's own
 *    counters), recent frame times, instances per species — read by the browser tests;
 *  - `window.__tetrawellCanvasProbe.toScreen(p)`: where a scene point (nm) is on the page (CSS px)
 *    and how far it is from the camera, so the browser tests can aim real mouse drags at handles.
 */
import { ringSegments, sphereSegments } from './markerDetail';
import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState, type MutableRefObject } from 'react';
import { Canvas, useFrame, useThree, type ThreeEvent } from '@react-three/fiber';
import { Html, OrbitControls, TransformControls } from '@react-three/drei';
import * as THREE from 'three';
import type { DesignDocument } from '@contracts/design';
import type { FarFieldReport } from '../../../../../geometry/farfield';
import { bondGraph } from '../../../../../geometry/arrays';
import { siteToNm, snapToLattice } from '../../../../../geometry/lattice';
import type { Species } from '../../../../../geometry/design/types';
import { CANVAS_THEME, layerTintOf, SELECTED_CSS, SELECTED_SCALE, SPECIES_ORDER, SPECIES_STYLE, WARNING_CSS } from '../palette';
import { AxisTriad, type AxisDirections } from './AxisTriad';
import type { Vec3 } from '../editorStore';
import { layerPointsNear, snapInLayer } from './layerSnap';
import { DeviceShapes } from './DeviceShapes';
import { electrodeBoxes, layerSlabs } from './deviceGeometry';

export type Tool = 'select' | 'place' | 'move';
export type ViewAxis = '001' | '100' | '110';

export interface CanvasStats {
  drawCalls: number;
  triangles: number;
  /** time to render each recent frame (ms), measured around WebGLRenderer.render */
  frameMs: number[];
  /** time between consecutive rendered frames (ms) */
  intervalMs: number[];
  lastFrameAt: number | null;
  instances: Partial<Record<Species, number>>;
  speciesMeshes: number;
  frames: number;
  /** host layers drawn as slabs and electrodes drawn as boxes (inside the domain box) */
  layerSlabs: number;
  electrodeBoxes: number;
}

/** Test hook: a scene point (nm) → page coordinates (CSS px, as mouse events use) and camera distance (nm). */
export interface CanvasProbe {
  toScreen: (p: [number, number, number]) => { x: number; y: number; distance: number };
}

declare global {
  interface Window {
    __tetrawellCanvasStats?: CanvasStats;
    __tetrawellCanvasProbe?: CanvasProbe;
  }
}

export interface ViewApi {
  fit: () => void;
  view: (axis: ViewAxis) => void;
}

export interface DesignCanvasProps {
  /** the document to draw (the edited one, or a preview while something is dragged) */
  document: DesignDocument;
  selection: readonly string[];
  tool: Tool;
  readOnly: boolean;
  report: FarFieldReport | null;
  placeSpecies: Species;
  /** active (001) layer, as the index k (z = k·a/4) */
  layerK: number;
  viewRef: MutableRefObject<ViewApi | null>;
  onSelect: (ids: string[], how: 'replace' | 'toggle' | 'add') => void;
  onPlace: (species: Species, position: Vec3) => void;
  /** a drag in progress (box face or moved sites): the document as it would be; null when it ends */
  onPreview: (doc: DesignDocument | null) => void;
  onCommitDomain: (halfExtentsNm: Vec3) => void;
  onCommitMove: (positions: Record<string, Vec3>) => void;
}

const tmpMatrix = new THREE.Matrix4();
/** Pointer-downs a box-face handle took: the canvas' selection band leaves these alone. */
const claimedByHandle = new WeakSet<Event>();
const tmpColor = new THREE.Color();
/** labels over the canvas: ink on a near-opaque white panel (contrast checked in tests/app/palette.test.ts) */
const labelPanel = { color: CANVAS_THEME.labelInk, background: `color-mix(in srgb, ${CANVAS_THEME.labelPanel} ${CANVAS_THEME.labelPanelAlpha * 100}%, transparent)`, boxShadow: '0 0 0 1px rgb(0 0 0 / 0.08)' } as const;

function SpeciesInstances({ species, sites, totalSites, unit, selected, onPick }: { species: Species; sites: { id: string; position: number[] }[]; totalSites: number; unit: number; selected: ReadonlySet<string>; onPick: (id: string, e: ThreeEvent<MouseEvent>) => void }) {
  const ref = useRef<THREE.InstancedMesh>(null);
  const style = SPECIES_STYLE[species];
  const r = style.radiusA * unit;
  const seg = sphereSegments(totalSites);
  useLayoutEffect(() => {
    const mesh = ref.current;
    if (!mesh) return;
    sites.forEach((s, i) => {
      // a selected site: darker and larger (a second cue besides colour)
      const on = selected.has(s.id);
      const ri = on ? r * SELECTED_SCALE : r;
      tmpMatrix.makeScale(ri, ri, ri).setPosition(s.position[0], s.position[1], s.position[2]);
      mesh.setMatrixAt(i, tmpMatrix);
      mesh.setColorAt(i, tmpColor.set(on ? SELECTED_CSS : style.css));
    });
    mesh.instanceMatrix.needsUpdate = true;
    if (mesh.instanceColor) mesh.instanceColor.needsUpdate = true;
    mesh.computeBoundingSphere();
  }, [sites, selected, r, style.css]);
  return (
    <instancedMesh
      key={`${sites.length}-${seg.width}`}
      ref={ref}
      name={`sites-${species}`}
      args={[undefined, undefined, sites.length]}
      onClick={(e) => {
        if (e.instanceId === undefined) return;
        e.stopPropagation();
        onPick(sites[e.instanceId].id, e);
      }}
    >
      {/* fewer facets for large designs: 10,000 spheres stay under a million triangles */}
      <sphereGeometry args={[1, seg.width, seg.height]} />
      <meshStandardMaterial color="#ffffff" roughness={0.45} metalness={0.05} />
    </instancedMesh>
  );
}

/** Rings around the sites that far-field warnings name (one instanced mesh, one draw call; coarser when many). */
function WarnedSites({ positions, radius }: { positions: number[][]; radius: number }) {
  const ref = useRef<THREE.InstancedMesh>(null);
  useLayoutEffect(() => {
    const mesh = ref.current;
    if (!mesh) return;
    positions.forEach((p, i) => mesh.setMatrixAt(i, tmpMatrix.makeScale(radius, radius, radius).setPosition(p[0], p[1], p[2])));
    mesh.instanceMatrix.needsUpdate = true;
    mesh.computeBoundingSphere();
  }, [positions, radius]);
  if (positions.length === 0) return null;
  const seg = ringSegments(positions.length);
  return (
    <instancedMesh key={positions.length} ref={ref} name="warning-rings" args={[undefined, undefined, positions.length]} raycast={() => null}>
      <torusGeometry args={[1, seg.radial > 3 ? 0.08 : 0.12, seg.radial, seg.tubular]} />
      <meshBasicMaterial color={WARNING_CSS} />
    </instancedMesh>
  );
}

const FACE_AXES: { axis: 0 | 1 | 2; sign: 1 | -1; name: string }[] = [
  { axis: 0, sign: 1, name: '+x' },
  { axis: 0, sign: -1, name: '−x' },
  { axis: 1, sign: 1, name: '+y' },
  { axis: 1, sign: -1, name: '−y' },
  { axis: 2, sign: 1, name: '+z' },
  { axis: 2, sign: -1, name: '−z' },
];

/** Faces nearest to the sites an error or warning concerns (boundary too close, density cut, outside). */
export function warnedFaces(doc: DesignDocument, report: FarFieldReport | null): Set<number> {
  const faces = new Set<number>();
  if (!report) return faces;
  const byId = new Map(doc.sites.map((s) => [s.id, s]));
  const { center, halfExtentsNm: h } = doc.domain;
  for (const w of report.warnings) {
    if (w.code !== 'boundary-too-close' && w.code !== 'density-cut' && w.code !== 'site-outside-domain') continue;
    for (const id of w.siteIds) {
      const s = byId.get(id);
      if (!s) continue;
      let best = 0, bestGap = Infinity;
      FACE_AXES.forEach((f, n) => {
        const gap = h[f.axis] - f.sign * (s.position[f.axis] - center[f.axis]);
        if (gap < bestGap) {
          bestGap = gap;
          best = n;
        }
      });
      faces.add(best);
    }
  }
  return faces;
}

function DomainBox({ doc, report, readOnly, onPreview, onCommit }: { doc: DesignDocument; report: FarFieldReport | null; readOnly: boolean; onPreview: (doc: DesignDocument | null) => void; onCommit: (h: Vec3) => void }) {
  const { center, halfExtentsNm: h } = doc.domain;
  const handles = useRef<THREE.InstancedMesh>(null);
  const { camera, gl } = useThree();
  const getThree = useThree((st) => st.get);
  const size = Math.max(0.15, 0.04 * Math.max(h[0], h[1], h[2]));
  const flagged = useMemo(() => warnedFaces(doc, report), [doc, report]);

  useLayoutEffect(() => {
    const mesh = handles.current;
    if (!mesh) return;
    FACE_AXES.forEach((f, n) => {
      const p: Vec3 = [center[0], center[1], center[2]];
      p[f.axis] += f.sign * h[f.axis];
      mesh.setMatrixAt(n, tmpMatrix.makeScale(size, size, size).setPosition(p[0], p[1], p[2]));
    });
    mesh.instanceMatrix.needsUpdate = true;
    mesh.computeBoundingSphere();
  }, [center, h, size]);

  const faceGeometry = useMemo(() => {
    const pos: number[] = [];
    for (const n of flagged) {
      const f = FACE_AXES[n];
      const u = (f.axis + 1) % 3, v = (f.axis + 2) % 3;
      const corner = (su: number, sv: number) => {
        const p = [center[0], center[1], center[2]];
        p[f.axis] += f.sign * h[f.axis];
        p[u] += su * h[u];
        p[v] += sv * h[v];
        return p;
      };
      const c = [corner(-1, -1), corner(1, -1), corner(1, 1), corner(-1, 1)];
      pos.push(...c[0], ...c[1], ...c[2], ...c[0], ...c[2], ...c[3]);
    }
    const g = new THREE.BufferGeometry();
    g.setAttribute('position', new THREE.Float32BufferAttribute(pos, 3));
    return g;
  }, [flagged, center, h]);
  useEffect(() => () => faceGeometry.dispose(), [faceGeometry]);

  const boxEdges = useMemo(() => new THREE.EdgesGeometry(new THREE.BoxGeometry(2 * h[0], 2 * h[1], 2 * h[2])), [h]);
  useEffect(() => () => boxEdges.dispose(), [boxEdges]);

  const startDrag = (e: ThreeEvent<PointerEvent>) => {
    if (readOnly || e.instanceId === undefined || e.button !== 0) return;
    e.stopPropagation();
    claimedByHandle.add(e.nativeEvent);
    const face = FACE_AXES[e.instanceId];
    const orbit = getThree().controls as unknown as { enabled: boolean } | null;
    if (orbit) orbit.enabled = false;
    const axis = new THREE.Vector3().setComponent(face.axis, 1);
    const c = new THREE.Vector3(...center);
    const raycaster = new THREE.Raycaster();
    let latest: Vec3 = [...h];
    const halfAt = (ev: PointerEvent): number | null => {
      const rect = gl.domElement.getBoundingClientRect();
      const ndc = new THREE.Vector2(((ev.clientX - rect.left) / rect.width) * 2 - 1, -((ev.clientY - rect.top) / rect.height) * 2 + 1);
      raycaster.setFromCamera(ndc, camera);
      // closest point on the face's axis line to the pointer ray (two-line closest approach)
      const d = raycaster.ray.direction, o = raycaster.ray.origin;
      const w0 = c.clone().sub(o);
      const b = axis.dot(d), dd = d.dot(w0), ee = axis.dot(w0);
      const denom = 1 - b * b;
      if (denom < 1e-6) return null;
      const t = (b * dd - ee) / denom;
      return Math.max(0.05, Math.round(face.sign * t * 100) / 100);
    };
    const move = (ev: PointerEvent) => {
      const half = halfAt(ev);
      if (half === null) return;
      latest = [...h];
      latest[face.axis] = half;
      onPreview({ ...doc, domain: { ...doc.domain, halfExtentsNm: latest } });
    };
    const up = () => {
      window.removeEventListener('pointermove', move);
      window.removeEventListener('pointerup', up);
      if (orbit) orbit.enabled = true;
      onPreview(null);
      if (latest.some((v, k) => v !== h[k])) onCommit(latest);
    };
    window.addEventListener('pointermove', move);
    window.addEventListener('pointerup', up);
  };

  return (
    <group>
      <mesh position={center} raycast={() => null} renderOrder={2}>
        <boxGeometry args={[2 * h[0], 2 * h[1], 2 * h[2]]} />
        <meshBasicMaterial color={CANVAS_THEME.boxFill} transparent opacity={0.06} depthWrite={false} side={THREE.DoubleSide} />
      </mesh>
      <lineSegments position={center} geometry={boxEdges} raycast={() => null}>
        <lineBasicMaterial color={CANVAS_THEME.boxEdge} />
      </lineSegments>
      {flagged.size > 0 && (
        <mesh geometry={faceGeometry} raycast={() => null} renderOrder={3}>
          <meshBasicMaterial color={WARNING_CSS} transparent opacity={0.12} depthWrite={false} side={THREE.DoubleSide} />
        </mesh>
      )}
      {!readOnly && (
        <instancedMesh ref={handles} args={[undefined, undefined, 6]} onPointerDown={startDrag} name="domain-box-handles">
          <boxGeometry args={[1, 1, 1]} />
          <meshStandardMaterial color={CANVAS_THEME.handle} roughness={0.6} />
        </instancedMesh>
      )}
    </group>
  );
}

function Bonds({ doc }: { doc: DesignDocument }) {
  const [hover, setHover] = useState<{ at: Vec3; length: number } | null>(null);
  const graph = useMemo(() => {
    if (doc.sites.length < 2) return null;
    const pos = new Float64Array(3 * doc.sites.length);
    doc.sites.forEach((s, i) => pos.set(s.position, 3 * i));
    try {
      return bondGraph(pos, { groups: doc.sites.map((s) => s.cluster) });
    } catch {
      return null;
    }
  }, [doc.sites]);
  const geometry = useMemo(() => {
    const g = new THREE.BufferGeometry();
    if (!graph) return g;
    const e = graph.edges, c = graph.centroids;
    const arr = new Float32Array(6 * (e.length / 2));
    for (let m = 0; m < e.length / 2; m++) {
      const p = e[2 * m], q = e[2 * m + 1];
      arr.set([c[3 * p], c[3 * p + 1], c[3 * p + 2], c[3 * q], c[3 * q + 1], c[3 * q + 2]], 6 * m);
    }
    g.setAttribute('position', new THREE.BufferAttribute(arr, 3));
    g.computeBoundingSphere();
    return g;
  }, [graph]);
  useEffect(() => () => geometry.dispose(), [geometry]);
  if (!graph || graph.edges.length === 0) return null;
  return (
    <>
      <lineSegments
        geometry={geometry}
        name="bonds"
        onPointerMove={(e) => {
          if (e.index === undefined) return;
          const m = Math.floor(e.index / 2);
          const p = graph.edges[2 * m], q = graph.edges[2 * m + 1], c = graph.centroids;
          setHover({ at: [(c[3 * p] + c[3 * q]) / 2, (c[3 * p + 1] + c[3 * q + 1]) / 2, (c[3 * p + 2] + c[3 * q + 2]) / 2], length: graph.lengths[m] });
        }}
        onPointerOut={() => setHover(null)}
      >
        <lineBasicMaterial color={CANVAS_THEME.bond} />
      </lineSegments>
      {hover && (
        <Html position={hover.at} center style={{ pointerEvents: 'none' }}>
          <span className="num whitespace-nowrap rounded bg-wafer-900/90 px-1.5 py-0.5 text-fine text-white">bond {hover.length.toFixed(3)} nm</span>
        </Html>
      )}
    </>
  );
}

/** The active (001) layer under the pointer: snap dots nearby and a ghost donor at the snapped site. */
function PlacementGuide({ doc, layerK, species, onPlace }: { doc: DesignDocument; layerK: number; species: Species; onPlace: (species: Species, p: Vec3) => void }) {
  const a = doc.host.latticeConstantNm;
  const z = (layerK * a) / 4;
  const [pointer, setPointer] = useState<[number, number] | null>(null);
  const snapped = pointer ? snapInLayer(pointer[0], pointer[1], layerK, a) : null;
  const dots = useMemo(() => {
    const g = new THREE.BufferGeometry();
    if (pointer) g.setAttribute('position', new THREE.BufferAttribute(layerPointsNear(pointer[0], pointer[1], layerK, a, 3 * a), 3));
    return g;
  }, [pointer, layerK, a]);
  useEffect(() => () => dots.dispose(), [dots]);
  const span = 4 * Math.max(...doc.domain.halfExtentsNm, 20);
  const ghost = snapped ? siteToNm(snapped, a) : null;
  return (
    <>
      <mesh
        position={[doc.domain.center[0], doc.domain.center[1], z]}
        name="placement-layer"
        onPointerMove={(e) => setPointer([e.point.x, e.point.y])}
        onPointerOut={() => setPointer(null)}
        onClick={(e) => {
          e.stopPropagation();
          const s = snapInLayer(e.point.x, e.point.y, layerK, a);
          onPlace(species, siteToNm(s, a));
        }}
      >
        <planeGeometry args={[span, span]} />
        <meshBasicMaterial transparent opacity={0.06} color={CANVAS_THEME.layer} depthWrite={false} side={THREE.DoubleSide} />
      </mesh>
      {pointer && (
        <points geometry={dots} raycast={() => null}>
          <pointsMaterial color={CANVAS_THEME.snapDot} size={4} sizeAttenuation={false} />
        </points>
      )}
      {ghost && (
        <mesh position={ghost} raycast={() => null} scale={SPECIES_STYLE[species].radiusA * a}>
          <sphereGeometry args={[1, 12, 8]} />
          <meshBasicMaterial color={SPECIES_STYLE[species].css} transparent opacity={0.5} />
        </mesh>
      )}
    </>
  );
}

/**
 * A translate handle at the selection's centroid; each moved site snaps to its nearest lattice site.
 * The drag works from the sites as they were when it began: while it runs, the canvas draws the
 * preview document, whose moved sites must not become the reference (else the release compares the
 * preview with itself and the move is lost).
 */
function MoveHandle({ doc, selection, onPreview, onCommit }: { doc: DesignDocument; selection: readonly string[]; onPreview: (d: DesignDocument | null) => void; onCommit: (p: Record<string, Vec3>) => void }) {
  const group = useRef<THREE.Group>(null);
  const picked = useMemo(() => doc.sites.filter((s) => selection.includes(s.id)), [doc.sites, selection]);
  const centroid = useMemo<Vec3>(() => {
    const c: Vec3 = [0, 0, 0];
    for (const s of picked) for (let k = 0; k < 3; k++) c[k] += s.position[k] / picked.length;
    return c;
  }, [picked]);
  const start = useRef<{ doc: DesignDocument; picked: typeof picked; centroid: Vec3 } | null>(null);
  const pending = useRef<Record<string, Vec3> | null>(null);
  if (picked.length === 0) return null;
  const a = doc.host.latticeConstantNm;
  const snappedMove = (from: NonNullable<typeof start.current>): Record<string, Vec3> => {
    const g = group.current!;
    const d = [g.position.x - from.centroid[0], g.position.y - from.centroid[1], g.position.z - from.centroid[2]];
    const out: Record<string, Vec3> = {};
    for (const s of from.picked) out[s.id] = siteToNm(snapToLattice([s.position[0] + d[0], s.position[1] + d[1], s.position[2] + d[2]], a), a);
    return out;
  };
  return (
    <>
      <group ref={group} position={centroid} />
      <TransformControls
        object={group as unknown as MutableRefObject<THREE.Object3D>}
        mode="translate"
        size={0.8}
        onMouseDown={() => {
          start.current = { doc, picked, centroid };
        }}
        onObjectChange={() => {
          const from = start.current;
          if (!from) return;
          const moved = snappedMove(from);
          pending.current = moved;
          onPreview({ ...from.doc, sites: from.doc.sites.map((s) => (moved[s.id] ? { ...s, position: moved[s.id] } : s)) });
        }}
        onMouseUp={() => {
          const moved = pending.current, from = start.current;
          pending.current = null;
          start.current = null;
          onPreview(null);
          if (moved && from && from.picked.some((s) => moved[s.id].some((v, k) => Math.abs(v - s.position[k]) > 1e-12))) onCommit(moved);
          else if (from) group.current?.position.set(...from.centroid);
        }}
      />
    </>
  );
}

/** Camera commands for the toolbar and keyboard, the scale bar, and the renderer statistics. */
function Rig({ doc, onViewApi, onScale, onAxes }: { doc: DesignDocument; onViewApi: (api: ViewApi | null) => void; onScale: (widthPx: number, label: string) => void; onAxes: (d: AxisDirections) => void }) {
  const { camera, controls, size, gl } = useThree();
  const docRef = useRef(doc);
  useEffect(() => {
    docRef.current = doc;
  }, [doc]);
  const stats = useRef<CanvasStats>({ drawCalls: 0, triangles: 0, frameMs: [], intervalMs: [], lastFrameAt: null, instances: {}, speciesMeshes: 0, frames: 0, layerSlabs: 0, electrodeBoxes: 0 });

  useEffect(() => {
    const bounds = () => {
      const d = docRef.current;
      const box = new THREE.Box3();
      const { center: c, halfExtentsNm: h } = d.domain;
      box.expandByPoint(new THREE.Vector3(c[0] - h[0], c[1] - h[1], c[2] - h[2]));
      box.expandByPoint(new THREE.Vector3(c[0] + h[0], c[1] + h[1], c[2] + h[2]));
      for (const s of d.sites) box.expandByPoint(new THREE.Vector3(...s.position));
      return box;
    };
    const orbit = () => controls as unknown as { target: THREE.Vector3; update: () => void } | null;
    const place = (dir: THREE.Vector3) => {
      const box = bounds();
      const target = box.getCenter(new THREE.Vector3());
      const radius = Math.max(box.getSize(new THREE.Vector3()).length() / 2, 1);
      const fov = ((camera as THREE.PerspectiveCamera).fov * Math.PI) / 180;
      const dist = (radius / Math.sin(fov / 2)) * 1.05;
      camera.position.copy(target).addScaledVector(dir.normalize(), dist);
      camera.near = dist / 1000;
      camera.far = dist * 20;
      camera.updateProjectionMatrix();
      const o = orbit();
      if (o) {
        o.target.copy(target);
        o.update();
      } else camera.lookAt(target);
    };
    onViewApi({
      fit: () => place(camera.position.clone().sub(orbit()?.target ?? new THREE.Vector3()).lengthSq() > 0 ? camera.position.clone().sub(orbit()?.target ?? new THREE.Vector3()) : new THREE.Vector3(1, -1.4, 1.1)),
      // [001]: looking down the growth axis (a hair off-axis, so the orbit's z-up frame stays defined)
      view: (axis) => place(axis === '001' ? new THREE.Vector3(0, -1e-3, 1) : axis === '100' ? new THREE.Vector3(1, 0, 0) : new THREE.Vector3(1, 1, 0)),
    });
    return () => onViewApi(null);
  }, [camera, controls, onViewApi]);

  useEffect(() => {
    const v = new THREE.Vector3();
    window.__tetrawellCanvasProbe = {
      toScreen: (p) => {
        camera.updateMatrixWorld();
        const rect = gl.domElement.getBoundingClientRect();
        v.set(p[0], p[1], p[2]).project(camera);
        return { x: rect.left + ((v.x + 1) / 2) * rect.width, y: rect.top + ((1 - v.y) / 2) * rect.height, distance: camera.position.distanceTo(new THREE.Vector3(p[0], p[1], p[2])) };
      },
    };
    return () => {
      delete window.__tetrawellCanvasProbe;
    };
  }, [camera, gl]);

  // This frame callback (priority 1) takes over rendering, so it can time the render and read the
  // renderer's own counters for exactly this frame. The canvas renders on demand (an orbit, an edit,
  // a hover), not in a loop, so an idle workspace costs no CPU.
  useFrame((state) => {
    const t0 = performance.now();
    state.gl.render(state.scene, state.camera);
    const t1 = performance.now();
    const s = stats.current;
    s.drawCalls = state.gl.info.render.calls;
    s.triangles = state.gl.info.render.triangles;
    s.frameMs.push(t1 - t0);
    if (s.lastFrameAt !== null) s.intervalMs.push(t1 - s.lastFrameAt);
    s.lastFrameAt = t1;
    if (s.frameMs.length > 600) s.frameMs.shift();
    if (s.intervalMs.length > 600) s.intervalMs.shift();
    s.frames++;
    window.__tetrawellCanvasStats = s;
    // scale bar: nm per pixel at the orbit target's distance, rounded to 1, 2 or 5 × 10^n nm
    const o = controls as unknown as { target: THREE.Vector3 } | null;
    const dist = camera.position.distanceTo(o?.target ?? new THREE.Vector3());
    const fov = ((camera as THREE.PerspectiveCamera).fov * Math.PI) / 180;
    const nmPerPx = (2 * dist * Math.tan(fov / 2)) / size.height;
    const want = 110 * nmPerPx;
    const p = Math.pow(10, Math.floor(Math.log10(want)));
    const nice = [1, 2, 5, 10].map((m) => m * p).reduce((best, v) => (Math.abs(v - want) < Math.abs(best - want) ? v : best));
    onScale(Math.round(nice / nmPerPx), `${nice >= 1 ? nice.toFixed(0) : nice.toPrecision(1)} nm`);
    // the crystal axes as the camera sees them (view-space x right, y up)
    const m = camera.matrixWorldInverse.elements;
    onAxes([
      [m[0], m[1]],
      [m[4], m[5]],
      [m[8], m[9]],
    ]);
  }, 1);
  useEffect(() => {
    const counts: Partial<Record<Species, number>> = {};
    for (const s of doc.sites) counts[s.species] = (counts[s.species] ?? 0) + 1;
    stats.current.instances = counts;
    stats.current.speciesMeshes = Object.keys(counts).length;
    void gl;
  }, [doc.sites, gl]);
  useEffect(() => {
    stats.current.layerSlabs = layerSlabs(doc).length;
    stats.current.electrodeBoxes = electrodeBoxes(doc).length;
  }, [doc]);
  return null;
}

export default function DesignCanvas(props: DesignCanvasProps) {
  const { document: doc, selection, tool, readOnly, report, viewRef } = props;
  const a = doc.host.latticeConstantNm;
  const selected = useMemo(() => new Set(selection), [selection]);
  const bySpecies = useMemo(() => {
    const m = new Map<Species, { id: string; position: number[] }[]>();
    for (const s of doc.sites) {
      const list = m.get(s.species);
      if (list) list.push(s);
      else m.set(s.species, [s]);
    }
    return m;
  }, [doc.sites]);
  // Display size of the spheres (not a physical radius): a lattice constant, or a fifth of the
  // typical site spacing when sites are far apart, so that sparse arrays stay visible
  const unit = useMemo(() => {
    const n = doc.sites.length;
    if (n < 2) return a;
    // typical spacing from a sample of up to 200 sites (their nearest neighbour among all)
    const step = Math.max(1, Math.floor(n / 200));
    const d: number[] = [];
    for (let i = 0; i < n; i += step) {
      let best = Infinity;
      const p = doc.sites[i].position;
      for (let j = 0; j < n; j++) if (j !== i) best = Math.min(best, (doc.sites[j].position[0] - p[0]) ** 2 + (doc.sites[j].position[1] - p[1]) ** 2 + (doc.sites[j].position[2] - p[2]) ** 2);
      d.push(Math.sqrt(best));
    }
    d.sort((u, v) => u - v);
    return Math.max(a, 0.2 * d[Math.floor(d.length / 2)]);
  }, [doc.sites, a]);
  const warnedPositions = useMemo(() => {
    if (!report) return [];
    const ids = new Set(report.warnings.filter((w) => w.severity !== 'info').flatMap((w) => w.siteIds));
    return doc.sites.filter((s) => ids.has(s.id)).map((s) => s.position);
  }, [doc.sites, report]);
  const scaleBar = useRef<HTMLDivElement>(null);
  const axesApi = useRef<((d: AxisDirections) => void) | null>(null);
  const onAxes = useCallback((d: AxisDirections) => axesApi.current?.(d), []);
  const scaleLabel = useRef<HTMLSpanElement>(null);
  const wrapper = useRef<HTMLDivElement>(null);
  const cameraRef = useRef<THREE.Camera | null>(null);
  const [band, setBand] = useState<{ x0: number; y0: number; x1: number; y1: number } | null>(null);
  const onViewApi = useCallback((api: ViewApi | null) => {
    viewRef.current = api;
  }, [viewRef]);
  // the scale bar is written straight into the DOM each frame (no React render per frame)
  const onScale = useCallback((widthPx: number, label: string) => {
    if (scaleBar.current) scaleBar.current.style.width = `${widthPx}px`;
    if (scaleLabel.current && scaleLabel.current.textContent !== label) scaleLabel.current.textContent = label;
  }, []);

  const onPick = (id: string, e: ThreeEvent<MouseEvent>) => {
    if (tool === 'place') return;
    props.onSelect([id], e.shiftKey ? 'toggle' : 'replace');
  };

  // box select: in the select tool a left drag on the canvas draws a band; sites projected inside it are selected
  const onPointerDown = (e: React.PointerEvent) => {
    // three.js' own handler runs first (on the canvas), so a face handle has claimed its drag by now
    if (tool !== 'select' || e.button !== 0 || claimedByHandle.has(e.nativeEvent)) return;
    const r = wrapper.current!.getBoundingClientRect();
    const x0 = e.clientX - r.left, y0 = e.clientY - r.top;
    let last = { x0, y0, x1: x0, y1: y0 };
    const move = (ev: PointerEvent) => {
      last = { x0, y0, x1: ev.clientX - r.left, y1: ev.clientY - r.top };
      if (Math.abs(last.x1 - x0) + Math.abs(last.y1 - y0) > 4) setBand(last);
    };
    const up = (ev: PointerEvent) => {
      window.removeEventListener('pointermove', move);
      window.removeEventListener('pointerup', up);
      setBand(null);
      if (Math.abs(last.x1 - x0) + Math.abs(last.y1 - y0) <= 4 || !cameraRef.current) return;
      const lx = Math.min(last.x0, last.x1), hx = Math.max(last.x0, last.x1), ly = Math.min(last.y0, last.y1), hy = Math.max(last.y0, last.y1);
      const v = new THREE.Vector3();
      const ids: string[] = [];
      for (const s of doc.sites) {
        v.set(s.position[0], s.position[1], s.position[2]).project(cameraRef.current);
        if (v.z > 1) continue;
        const px = ((v.x + 1) / 2) * r.width, py = ((1 - v.y) / 2) * r.height;
        if (px >= lx && px <= hx && py >= ly && py <= hy) ids.push(s.id);
      }
      props.onSelect(ids, ev.shiftKey ? 'add' : 'replace');
    };
    window.addEventListener('pointermove', move);
    window.addEventListener('pointerup', up);
  };

  const legend = SPECIES_ORDER.filter((sp) => bySpecies.has(sp));
  const initialDist = Math.max(...doc.domain.halfExtentsNm) * 3.2 + 5;
  const c = doc.domain.center;

  return (
    <div ref={wrapper} role="region" aria-label="Design canvas" className="relative h-full min-h-[320px] overflow-hidden rounded-md border border-wafer-200 lg:min-h-0" style={{ background: CANVAS_THEME.ground }} onPointerDown={onPointerDown}>
      <Canvas
        frameloop="demand"
        camera={{ position: [c[0] + initialDist * 0.55, c[1] - initialDist * 0.75, c[2] + initialDist * 0.6], up: [0, 0, 1], fov: 40, near: 0.01, far: 1e5 }}
        raycaster={{ params: { Line: { threshold: 0.15 }, Points: { threshold: 0.1 }, Mesh: {}, LOD: {}, Sprite: {} } }}
        gl={{ antialias: true, preserveDrawingBuffer: true }}
        onCreated={({ camera }) => {
          cameraRef.current = camera;
        }}
        onPointerMissed={(e) => {
          if (tool === 'select' && !e.shiftKey) props.onSelect([], 'replace');
        }}
      >
        <color attach="background" args={[CANVAS_THEME.ground]} />
        <ambientLight intensity={1.1} />
        <directionalLight position={[30, -40, 60]} intensity={2.2} />
        <directionalLight position={[-40, 30, -20]} intensity={0.6} />
        <OrbitControls
          makeDefault
          target={c}
          enableDamping={false}
          mouseButtons={tool === 'select' ? { LEFT: -1 as unknown as THREE.MOUSE, MIDDLE: THREE.MOUSE.PAN, RIGHT: THREE.MOUSE.ROTATE } : { LEFT: THREE.MOUSE.ROTATE, MIDDLE: THREE.MOUSE.DOLLY, RIGHT: THREE.MOUSE.PAN }}
        />
        <Rig doc={doc} onViewApi={onViewApi} onScale={onScale} onAxes={onAxes} />
        {SPECIES_ORDER.filter((sp) => bySpecies.has(sp)).map((sp) => (
          <SpeciesInstances key={sp} species={sp} sites={bySpecies.get(sp)!} totalSites={doc.sites.length} unit={unit} selected={selected} onPick={onPick} />
        ))}
        <WarnedSites positions={warnedPositions} radius={1.1 * unit} />
        <Bonds doc={doc} />
        <DeviceShapes doc={doc} />
        <DomainBox doc={doc} report={report} readOnly={readOnly} onPreview={props.onPreview} onCommit={props.onCommitDomain} />
        {!readOnly && tool === 'place' && <PlacementGuide doc={doc} layerK={props.layerK} species={props.placeSpecies} onPlace={props.onPlace} />}
        {!readOnly && tool === 'move' && <MoveHandle doc={doc} selection={selection} onPreview={props.onPreview} onCommit={props.onCommitMove} />}
      </Canvas>
      {band && (
        <div
          aria-hidden="true"
          className="pointer-events-none absolute border border-phosphor-700 bg-phosphor-500/10"
          style={{ left: Math.min(band.x0, band.x1), top: Math.min(band.y0, band.y1), width: Math.abs(band.x1 - band.x0), height: Math.abs(band.y1 - band.y0) }}
        />
      )}
      <AxisTriad apiRef={axesApi} />
      <div className="pointer-events-none absolute bottom-2 left-2 flex items-center gap-2 rounded px-2 py-1.5 text-fine" style={labelPanel}>
        <div ref={scaleBar} className="h-1.5 border-x-2 border-b-2" style={{ width: 100, borderColor: CANVAS_THEME.labelInk }} />
        <span ref={scaleLabel} className="num font-semibold">— nm</span>
      </div>
      <ul aria-label="Species legend" className="pointer-events-none absolute bottom-2 right-2 space-y-0.5 rounded px-2 py-1.5 text-fine" style={labelPanel}>
        {legend.map((sp) => (
          <li key={sp} className="flex items-center gap-1.5">
            <span aria-hidden="true" className="inline-block rounded-full" style={{ background: SPECIES_STYLE[sp].css, width: 6 + 8 * SPECIES_STYLE[sp].radiusA, height: 6 + 8 * SPECIES_STYLE[sp].radiusA }} />
            {SPECIES_STYLE[sp].label} <span className="num" style={{ color: CANVAS_THEME.labelMuted }}>× {bySpecies.get(sp)!.length.toLocaleString('en-US')}</span>
          </li>
        ))}
        {selection.length > 0 && (
          <li className="flex items-center gap-1.5">
            <span aria-hidden="true" className="inline-block h-3 w-3 rounded-full" style={{ background: SELECTED_CSS }} />
            selected (drawn larger)
          </li>
        )}
        {warnedPositions.length > 0 && (
          <li className="flex items-center gap-1.5">
            <span aria-hidden="true" className="inline-block h-3 w-3 rounded-full border-2" style={{ borderColor: WARNING_CSS }} />
            far-field warning
          </li>
        )}
        {doc.host.layers && (
          <li className="flex items-center gap-1.5">
            <span aria-hidden="true" className="inline-flex gap-0.5">
              {doc.host.layers.slice(0, 4).map((layer, k) => (
                <span key={k} className="inline-block h-3 w-3 rounded-sm border" style={{ background: layerTintOf(k), opacity: 0.6, borderColor: CANVAS_THEME.layerEdge }} />
              ))}
            </span>
            layers, one tint each (bottom to top)
          </li>
        )}
        {doc.electrodes && (
          <li className="flex items-center gap-1.5">
            <span aria-hidden="true" className="inline-block h-3 w-3" style={{ background: CANVAS_THEME.electrode }} />
            metal electrode (box)
          </li>
        )}
        <li style={{ color: CANVAS_THEME.labelMuted }}>sphere size tells species apart too</li>
      </ul>
    </div>
  );
}
