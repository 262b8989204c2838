/**
 * Development-only page for the far-field panel before the studio hosts it: `npm run dev`, then
 * open /dev/farfield-preview.html. Not part of the build (Vite builds app/index.html only).
 * An invented 3×3 square array at 8 lattice constants; buttons stand in for the studio's edits.
 */
import { StrictMode, useEffect, useRef, useState } from 'react';
import { createRoot } from 'react-dom/client';
import '@fontsource/manrope/400.css';
import '@fontsource/manrope/700.css';
import '../src/styles.css';
import type { DesignDocument } from '@contracts/design';
import { generateArray } from '../../geometry/arrays';
import { siteToNm, snapToLattice } from '../../geometry/lattice';
import { FarFieldPanel, useFarField } from '../src/features/studio/farfield';

const A = 0.5431020511; // CODATA 2018 lattice constant of Si (nm)

function start(nx: number): DesignDocument {
  return {
    format: 'tetrawell-design',
    version: 1,
    name: 'Preview: invented square array',
    host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: A },
    sites: generateArray({ kind: 'square', nx, ny: nx, spacingNm: 8 * A, latticeConstantNm: A }),
    domain: { center: [0, 0, 0], halfExtentsNm: [4 * A * nx + 20, 4 * A * nx + 20, 20], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 1e-3, maxElements: 2_000_000 },
  };
}

function Preview() {
  const [doc, setDoc] = useState<DesignDocument>(() => start(3));
  const [readOnly, setReadOnly] = useState(false);
  const live = useFarField(doc);
  // time from an edit to the bounds that answer it (shown for checking speed by eye)
  const editedAt = useRef(0);
  const [latency, setLatency] = useState<number | null>(null);
  useEffect(() => {
    if (editedAt.current && !live.computing) {
      setLatency(performance.now() - editedAt.current);
      editedAt.current = 0;
    }
  }, [live.report, live.computing]);
  const shrink = () => setDoc((d) => ({ ...d, domain: { ...d.domain, halfExtentsNm: d.domain.halfExtentsNm.map((h) => h * 0.8) as [number, number, number] } }));
  const move = () => {
    editedAt.current = performance.now();
    setDoc((d) => {
      const sites = d.sites.slice();
      const s = sites[0];
      sites[0] = { ...s, position: siteToNm(snapToLattice([s.position[0] + A, s.position[1], s.position[2]], A), A) };
      return { ...d, sites };
    });
  };
  return (
    <main className="mx-auto max-w-3xl space-y-3 p-4">
      <div className="flex flex-wrap gap-2 text-note">
        <button type="button" className="rounded border px-2 py-1" onClick={shrink}>Shrink box by 20 %</button>
        <button type="button" className="rounded border px-2 py-1" onClick={move}>Move first site by a</button>
        <button type="button" className="rounded border px-2 py-1" onClick={() => setDoc(start(100))}>10,000 sites</button>
        <label className="flex items-center gap-1">
          <input type="checkbox" checked={readOnly} onChange={(e) => setReadOnly(e.target.checked)} /> viewer (read-only)
        </label>
        <output data-testid="latency">{latency === null ? '' : `last update ${latency.toFixed(0)} ms`}</output>
      </div>
      <FarFieldPanel
        {...live}
        document={doc}
        readOnly={readOnly}
        onApplyRecommended={(halfExtentsNm) => setDoc((d) => ({ ...d, domain: { ...d.domain, halfExtentsNm } }))}
      />
    </main>
  );
}

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <Preview />
  </StrictMode>,
);
