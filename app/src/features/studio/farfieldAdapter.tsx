/**
 * The seam to the far-field panel owned by the far-field branch (app/src/features/studio/farfield/):
 *   useFarField(document) → { report, computing, error }
 *   <FarFieldPanel report computing error document readOnly onApplyRecommended />
 * Until that branch is merged this file stands in with a main-thread check (same geometry/ code,
 * deferred so typing stays responsive) and a plain panel; afterwards it only re-exports theirs.
 */
import { useDeferredValue, useMemo } from 'react';
import type { DesignDocument } from '@contracts/design';
import { farFieldCheck, type FarFieldReport } from '../../../../geometry/farfield';
import { EstimateNote } from '../../components/EstimateNote';
import { Button } from '../../components/Button';

export function useFarField(document: DesignDocument): { report: FarFieldReport | null; computing: boolean; error: string | null } {
  const deferred = useDeferredValue(document);
  const result = useMemo(() => {
    try {
      return { report: farFieldCheck(deferred), error: null };
    } catch (err) {
      return { report: null, error: err instanceof Error ? err.message : String(err) };
    }
  }, [deferred]);
  return { ...result, computing: deferred !== document };
}

const pct = (x: number | null) => (x === null ? '—' : `${(100 * x).toPrecision(3)} %`);

export function FarFieldPanel({
  report,
  computing,
  error,
  readOnly,
  onApplyRecommended,
}: {
  report: FarFieldReport | null;
  computing: boolean;
  error: string | null;
  document: DesignDocument;
  readOnly: boolean;
  onApplyRecommended: (halfExtentsNm: [number, number, number]) => void;
}) {
  const worstU = report ? maxOf(report.sites.map((s) => s.uRelBound)) : null;
  const worstV = report ? maxOf(report.pairs.map((p) => p.vRelBound)) : null;
  return (
    <section aria-label="Far-field check" className="space-y-2 text-note">
      <h2 className="text-fine font-bold uppercase tracking-wider text-wafer-500">Far-field check {computing && <span className="normal-case text-wafer-400">(updating…)</span>}</h2>
      {error && <p role="alert" className="text-garnet-700">{error}</p>}
      {report && (
        <>
          <dl className="num grid grid-cols-2 gap-x-3 gap-y-1">
            <dt>Worst bound on U</dt>
            <dd>{pct(worstU)} of U</dd>
            <dt>Worst bound on V</dt>
            <dd>{pct(worstV)} of V</dd>
            <dt>Boundary</dt>
            <dd>{report.boundary}</dd>
            <dt>Recommended half-extents</dt>
            <dd>{report.recommendedHalfExtentsNm.map((h) => h.toFixed(2)).join(' × ')} nm</dd>
          </dl>
          {!readOnly && (
            <Button variant="secondary" onClick={() => onApplyRecommended(report.recommendedHalfExtentsNm)}>
              Apply recommended size
            </Button>
          )}
          <ul aria-label="Far-field warnings" className="space-y-1">
            {report.warnings.map((w, i) => (
              <li key={i} className={w.severity === 'info' ? 'text-wafer-600' : 'text-ember-800'}>
                <span className="font-semibold">{w.severity}:</span> {w.message}
              </li>
            ))}
          </ul>
          <EstimateNote />
        </>
      )}
    </section>
  );
}

function maxOf(xs: (number | null)[]): number | null {
  let m: number | null = null;
  for (const x of xs) if (x !== null && (m === null || x > m)) m = x;
  return m;
}
