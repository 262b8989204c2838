/**
 * The device on the canvas (issue 11): host layers as translucent slabs clipped to the domain box,
 * with their names and εr; metal electrodes as solid boxes with name and voltage. Four draw calls
 * whatever the counts (slabs, slab outlines, boxes, box outlines: merged buffers from
 * deviceGeometry.ts); labels are DOM (drei's Html), not drawn by WebGL. Nothing here takes pointer
 * events, so the tools work through the slabs.
 */
import { useEffect, useMemo } from 'react';
import { Html } from '@react-three/drei';
import * as THREE from 'three';
import type { DesignDocument } from '@contracts/design';
import { CANVAS_THEME, layerTintOf } from '../palette';
import { boxEdges, boxTriangles, electrodeBoxes, layerSlabs, voltText } from './deviceGeometry';

const noRaycast = () => null;
const labelStyle = {
  color: CANVAS_THEME.labelInk,
  background: `color-mix(in srgb, ${CANVAS_THEME.labelPanel} ${CANVAS_THEME.labelPanelAlpha * 100}%, transparent)`,
  boxShadow: '0 0 0 1px rgb(0 0 0 / 0.08)',
} as const;

function rgbOf(css: string): [number, number, number] {
  const c = new THREE.Color(css);
  return [c.r, c.g, c.b];
}

function useBufferGeometry(positions: Float32Array, colors?: Float32Array, normals = false): THREE.BufferGeometry {
  const g = useMemo(() => {
    const geo = new THREE.BufferGeometry();
    geo.setAttribute('position', new THREE.BufferAttribute(positions, 3));
    if (colors) geo.setAttribute('color', new THREE.BufferAttribute(colors, 3));
    if (normals) geo.computeVertexNormals();
    geo.computeBoundingSphere();
    return geo;
  }, [positions, colors, normals]);
  useEffect(() => () => g.dispose(), [g]);
  return g;
}

export function DeviceShapes({ doc }: { doc: DesignDocument }) {
  const slabs = useMemo(() => layerSlabs(doc), [doc]);
  const boxes = useMemo(() => electrodeBoxes(doc), [doc]);
  const slabBuf = useMemo(() => {
    // tint by the layer's place in the stack (layerTintOf), so each layer of a typical stack has
    // its own and neighbours differ even when one is clipped away; still one buffer, one draw call
    return boxTriangles(slabs, (k) => rgbOf(layerTintOf(slabs[k].index)));
  }, [slabs]);
  const slabEdgeBuf = useMemo(() => boxEdges(slabs), [slabs]);
  const boxBuf = useMemo(() => boxTriangles(boxes, () => [1, 1, 1]), [boxes]);
  const boxEdgeBuf = useMemo(() => boxEdges(boxes), [boxes]);
  const slabGeo = useBufferGeometry(slabBuf.positions, slabBuf.colors);
  const slabEdges = useBufferGeometry(slabEdgeBuf);
  const boxGeo = useBufferGeometry(boxBuf.positions, undefined, true);
  const boxEdgesGeo = useBufferGeometry(boxEdgeBuf);

  return (
    <group name="device">
      {slabs.length > 0 && (
        <>
          <mesh name="layer-slabs" geometry={slabGeo} raycast={noRaycast} renderOrder={1}>
            <meshBasicMaterial vertexColors transparent opacity={CANVAS_THEME.layerOpacity} depthWrite={false} side={THREE.DoubleSide} />
          </mesh>
          <lineSegments name="layer-outlines" geometry={slabEdges} raycast={noRaycast}>
            <lineBasicMaterial color={CANVAS_THEME.layerEdge} />
          </lineSegments>
          {slabs.map((s) => (
            <Html key={`layer-${s.index}`} position={[s.hi[0], s.lo[1], (s.lo[2] + s.hi[2]) / 2]} zIndexRange={[5, 0]} pointerEvents="none">
              <div data-testid="layer-label" className="whitespace-nowrap rounded px-1.5 py-0.5 text-fine" style={labelStyle}>
                <span aria-hidden="true" className="mr-1 inline-block h-2.5 w-2.5 rounded-sm align-middle" style={{ background: layerTintOf(s.index) }} />
                <span className="font-semibold">{s.name}</span> <span className="num">εr {s.epsilonR}</span>
              </div>
            </Html>
          ))}
        </>
      )}
      {boxes.length > 0 && (
        <>
          <mesh name="electrodes" geometry={boxGeo} raycast={noRaycast}>
            <meshStandardMaterial color={CANVAS_THEME.electrode} roughness={0.35} metalness={0.55} />
          </mesh>
          <lineSegments name="electrode-outlines" geometry={boxEdgesGeo} raycast={noRaycast}>
            <lineBasicMaterial color={CANVAS_THEME.electrodeEdge} />
          </lineSegments>
          {boxes.map((b) => (
            <Html key={`electrode-${b.index}`} position={[(b.lo[0] + b.hi[0]) / 2, (b.lo[1] + b.hi[1]) / 2, b.hi[2]]} center zIndexRange={[5, 0]} pointerEvents="none">
              <div data-testid="electrode-label" className="whitespace-nowrap rounded px-1.5 py-0.5 text-fine" style={labelStyle}>
                <span aria-hidden="true" className="mr-1 inline-block h-2.5 w-2.5 align-middle" style={{ background: CANVAS_THEME.electrode }} />
                <span className="font-semibold">{b.name}</span> <span className="num">{voltText(b.voltageV)}</span>
              </div>
            </Html>
          ))}
        </>
      )}
    </group>
  );
}
