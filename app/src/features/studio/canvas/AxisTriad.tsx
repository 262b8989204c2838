/**
 * The crystal axes of the canvas as a small drawing in its corner: three arrows along [100], [010]
 * and [001] (x, y, z of the scene) as the camera sees them, each named in words, so no colour code
 * is needed to tell them apart. It is written straight into the SVG on each rendered frame (no
 * React render per frame): the canvas calls the function it publishes in `apiRef`.
 */
import { useEffect, useRef, type MutableRefObject } from 'react';
import { CANVAS_THEME } from '../palette';

/** screen directions (x right, y up; length ≤ 1 as seen foreshortened) of the three axes */
export type AxisDirections = [[number, number], [number, number], [number, number]];

const AXES = [
  { name: 'x', dir: '[100]' },
  { name: 'y', dir: '[010]' },
  { name: 'z', dir: '[001]' },
] as const;
const SIZE = 140;
const C = SIZE / 2;
const L = 24;

export function AxisTriad({ apiRef }: { apiRef: MutableRefObject<((d: AxisDirections) => void) | null> }) {
  const lines = useRef<(SVGLineElement | null)[]>([]);
  const labels = useRef<(SVGTextElement | null)[]>([]);
  useEffect(() => {
    apiRef.current = (d) => {
      d.forEach(([x, y], k) => {
        const line = lines.current[k], label = labels.current[k];
        if (!line || !label) return;
        line.setAttribute('x2', (C + L * x).toFixed(1));
        line.setAttribute('y2', (C - L * y).toFixed(1));
        // the name sits beyond the arrow's tip; an axis seen end-on gets its name just above the centre
        const len = Math.hypot(x, y);
        // the text grows away from the tip (start, end or centred on it), so it stays inside the drawing
        const [ux, uy] = len > 0.15 ? [x / len, y / len] : [0.6, 0.8];
        const [lx, ly] = [C + L * x + 4 * ux, C - L * y - 9 * uy];
        label.setAttribute('text-anchor', ux > 0.4 ? 'start' : ux < -0.4 ? 'end' : 'middle');
        label.setAttribute('x', lx.toFixed(1));
        label.setAttribute('y', (ly + 3.5).toFixed(1));
      });
    };
    return () => {
      apiRef.current = null;
    };
  }, [apiRef]);
  return (
    <svg width={SIZE} height={SIZE} role="img" aria-label="Crystal axes: x along [100], y along [010], z along [001]" className="pointer-events-none absolute right-2 top-2 rounded" style={{ background: CANVAS_THEME.labelPanel, opacity: CANVAS_THEME.labelPanelAlpha }}>
      <defs>
        <marker id="axis-tip" viewBox="0 0 6 6" refX="5" refY="3" markerWidth="6" markerHeight="6" orient="auto">
          <path d="M0,0 L6,3 L0,6 z" fill={CANVAS_THEME.labelInk} />
        </marker>
      </defs>
      {AXES.map((a, k) => (
        <g key={a.name}>
          <line ref={(el) => void (lines.current[k] = el)} x1={C} y1={C} x2={C} y2={C} stroke={CANVAS_THEME.labelInk} strokeWidth={1.5} markerEnd="url(#axis-tip)" />
          <text ref={(el) => void (labels.current[k] = el)} x={C} y={C} textAnchor="middle" fontSize={11} fill={CANVAS_THEME.labelInk} className="num">
            <tspan fontWeight={700}>{a.name}</tspan> {a.dir}
          </text>
        </g>
      ))}
    </svg>
  );
}
