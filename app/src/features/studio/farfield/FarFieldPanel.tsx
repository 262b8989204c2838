/**
 * The far-field panel of the design studio (region "Far-field check"): how much the domain box's
 * boundary condition can err in U and V, the smallest box that meets the design's target error,
 * the element count its graded mesh would need, the warnings, and what the model assumes.
 * Numbers come from useFarField (the same geometry/farfield code as `npm run cli -- check`).
 */
import { useId, useMemo, useState } from 'react';
import type { DesignDocument } from '@contracts/design';
import { BOUND_REASON_CLAUSE } from '@contracts/farfieldWords';
import type { FarFieldReport, FarFieldWarning, PairBound, SiteBound } from '../../../../../geometry/farfield';
import { Button } from '../../../components/Button';
import { EstimateNote } from '../../../components/EstimateNote';
import { FigureTable, type FigureColumn } from './FigureTable';
import { boundSummary, boundWords, hasBoundKinds, type BoundGroup } from './boundWords';
import { findingText, imageEffectMeaning, imageEffectOf, signedPercent, siteName, type ImageEffectFigure } from './imageEffect';
import { meV, nm, percent, sortPairs, sortSites, worstU, worstV, type Direction, type PairColumn, type SiteColumn } from './figures';

export interface FarFieldPanelProps {
  report: FarFieldReport | null;
  computing: boolean;
  error: string | null;
  document: DesignDocument;
  readOnly: boolean;
  onApplyRecommended: (halfExtentsNm: [number, number, number]) => void;
  /** the bounds are current and the element estimate is still coming (from useFarField) */
  elementsPending?: boolean;
}

const SEVERITY_WORD: Record<FarFieldWarning['severity'], string> = { error: 'Problem', warning: 'Warning', info: 'Note' };
const SEVERITY_STYLE: Record<FarFieldWarning['severity'], string> = {
  error: 'border-garnet-300 bg-garnet-50 text-garnet-700',
  warning: 'border-ember-300 bg-ember-50 text-ember-800',
  info: 'border-wafer-200 bg-wafer-50 text-wafer-700',
};

function boundaryWords(b: DesignDocument['domain']['boundary']): string {
  return b.kind === 'grounded' ? 'grounded walls' : `a multipole boundary to order ${b.order}`;
}

function Verdict({ value, target }: { value: number | null; target: number }) {
  if (value === null) return <span className="font-semibold text-garnet-700">no bound</span>;
  const over = value > target;
  return <span className={over ? 'font-semibold text-ember-800' : 'font-semibold text-phosphor-700'}>{over ? 'over target' : 'within target'}</span>;
}

function Headline({ label, what, figure, target }: { label: string; what: string; figure: { value: number | null; count: number }; target: number }) {
  return (
    <div className="rounded-md border border-wafer-200 px-3 py-2">
      <dt className="text-fine text-wafer-600">
        {label} <span className="text-wafer-500">({what})</span>
      </dt>
      <dd className="num mt-0.5">
        {figure.count === 0 ? (
          <span className="text-note text-wafer-500">none to bound</span>
        ) : (
          <>
            <span className="text-lead font-bold text-wafer-900">{percent(figure.value)}</span>{' '}
            <span className="text-fine text-wafer-600">
              target {percent(target)} · <Verdict value={figure.value} target={target} />
            </span>
          </>
        )}
      </dd>
    </div>
  );
}

/**
 * The kind of a bound as a word; an estimate gets a calm marking (a dotted outline on the
 * notebook's amber tint, the colour of model caveats, not of warnings), and the reason in words as
 * the title and, for screen readers, as text after the kind.
 */
export function BoundMark({ kind, reason, spoken = true }: { kind: SiteBound['boundKind']; reason: SiteBound['boundReason']; /** false where the clause follows in plain text anyway */ spoken?: boolean }) {
  if (kind === undefined) return <span className="text-wafer-500">—</span>;
  const clause = reason ? BOUND_REASON_CLAUSE[reason] : '';
  const title = boundWords({ boundKind: kind, boundReason: reason });
  return (
    <span
      title={title}
      data-bound={kind}
      className={
        kind === 'estimated'
          ? 'rounded-sm border border-dotted border-ember-600 bg-ember-50 px-1 text-ember-800'
          : 'text-wafer-700'
      }
    >
      {kind}
      {spoken && clause && <span className="sr-only">: {clause}</span>}
    </span>
  );
}

const boundColumn: FigureColumn<SiteBound, SiteColumn> = {
  key: 'bound',
  label: 'Bound',
  cell: (s) => <BoundMark kind={s.boundKind} reason={s.boundReason} />,
};

const siteColumns: FigureColumn<SiteBound, SiteColumn>[] = [
  { key: 'id', label: 'Site', cell: (s) => s.id },
  { key: 'clearanceNm', label: 'Clearance', unit: 'nm', numeric: true, cell: (s) => nm(s.clearanceNm).replace(' nm', '') },
  { key: 'requiredClearanceNm', label: 'Needed', unit: 'nm', numeric: true, cell: (s) => nm(s.requiredClearanceNm).replace(' nm', '') },
  { key: 'uBoundEv', label: '|ΔU| bound', unit: 'meV', numeric: true, cell: (s) => meV(s.uBoundEv).replace(' meV', '') },
  { key: 'uRelBound', label: 'Relative', unit: '%', numeric: true, cell: (s) => percent(s.uRelBound).replace(' %', '') },
  { key: 'chargeOutside', label: 'Density outside', unit: '%', numeric: true, cell: (s) => percent(s.chargeOutside).replace(' %', '') },
];

const pairColumns: FigureColumn<PairBound, PairColumn>[] = [
  { key: 'pair', label: 'Pair', cell: (p) => `${p.a}–${p.b}` },
  { key: 'distanceNm', label: 'R', unit: 'nm', numeric: true, cell: (p) => nm(p.distanceNm).replace(' nm', '') },
  { key: 'vEv', label: 'V', unit: 'meV', numeric: true, cell: (p) => `${meV(p.vEv).replace(' meV', '')}${p.vModel === 'point-charge' ? '*' : ''}` },
  { key: 'vBoundEv', label: '|ΔV| bound', unit: 'meV', numeric: true, cell: (p) => meV(p.vBoundEv).replace(' meV', '') },
  { key: 'vRelBound', label: 'Relative', unit: '%', numeric: true, cell: (p) => percent(p.vRelBound).replace(' %', '') },
];

function Figures({ report }: { report: FarFieldReport }) {
  const [view, setView] = useState<'sites' | 'pairs'>('sites');
  const [siteSort, setSiteSort] = useState<{ column: SiteColumn; direction: Direction }>({ column: 'uRelBound', direction: 'descending' });
  const [pairSort, setPairSort] = useState<{ column: PairColumn; direction: Direction }>({ column: 'vRelBound', direction: 'descending' });
  // the Bound column only where the report gives kinds (a layered host or electrodes), beside the
  // site's name so the narrow panel shows both without scrolling sideways; a sort by it falls back
  // to the relative bound when an edit takes the kinds away
  const withKinds = hasBoundKinds(report);
  const columns = useMemo(() => (withKinds ? [siteColumns[0], boundColumn, ...siteColumns.slice(1)] : siteColumns), [withKinds]);
  const shownSort = useMemo(() => (!withKinds && siteSort.column === 'bound' ? { column: 'uRelBound' as const, direction: siteSort.direction } : siteSort), [withKinds, siteSort]);
  const sites = useMemo(() => sortSites(report.sites, shownSort.column, shownSort.direction), [report.sites, shownSort]);
  const pairs = useMemo(() => sortPairs(report.pairs, pairSort.column, pairSort.direction), [report.pairs, pairSort]);
  const flip = <K,>(cur: { column: K; direction: Direction }, column: K) =>
    ({ column, direction: cur.column === column && cur.direction === 'descending' ? 'ascending' : 'descending' }) as { column: K; direction: Direction };
  const tab = (which: 'sites' | 'pairs', label: string) => (
    <button
      type="button"
      aria-pressed={view === which}
      onClick={() => setView(which)}
      className={`rounded-sm px-2 py-0.5 text-fine font-semibold ${view === which ? 'bg-wafer-800 text-white' : 'text-wafer-700 hover:bg-wafer-100'}`}
    >
      {label}
    </button>
  );
  return (
    <div className="space-y-2">
      <div className="flex items-center gap-1" role="group" aria-label="Figures to list">
        {tab('sites', `Per site (${report.sites.length})`)}
        {tab('pairs', `Per pair (${report.pairs.length})`)}
      </div>
      {view === 'sites' ? (
        <FigureTable caption="Far-field figures per site" rows={sites} columns={columns} rowKey={(s) => s.id} sort={shownSort} onSort={(c) => setSiteSort((cur) => flip(cur, c))} />
      ) : report.pairs.length ? (
        <>
          <FigureTable caption="Far-field figures per pair" rows={pairs} columns={pairColumns} rowKey={(p) => `${p.a}\u0000${p.b}`} sort={pairSort} onSort={(c) => setPairSort((cur) => flip(cur, c))} />
          {report.pairs.some((p) => p.vModel === 'point-charge') && (
            <p className="text-fine text-wafer-600">* point-charge value e²/(4πε R): these two orbitals have no closed form here.</p>
          )}
        </>
      ) : (
        <p className="text-note text-wafer-600">No pairs to bound.</p>
      )}
    </div>
  );
}

function Warnings({ warnings }: { warnings: FarFieldWarning[] }) {
  if (!warnings.length) return <p className="text-note text-phosphor-700">No warnings.</p>;
  return (
    <ul className="space-y-1.5" aria-label="Far-field warnings">
      {warnings.map((w) => (
        <li key={w.code} className={`rounded-md border px-2.5 py-1.5 text-note ${SEVERITY_STYLE[w.severity]}`} data-code={w.code}>
          <span className="font-semibold">{SEVERITY_WORD[w.severity]}: </span>
          {w.message}
          {w.siteIds.length > 0 && (
            <span className="text-fine">
              {' '}
              (sites {w.siteIds.slice(0, 8).join(', ')}
              {w.siteIds.length > 8 ? ` and ${w.siteIds.length - 8} more` : ''})
            </span>
          )}
        </li>
      ))}
    </ul>
  );
}

/**
 * How many sites have a rigorous far-field bound and how many an estimate, and why, in the words
 * of `check` ("Boundary bounds in this stack: …"; its text is boundSummaryText's).
 */
export function BoundSummary({ groups }: { groups: readonly BoundGroup[] }) {
  return (
    <p aria-label="Boundary bounds" className="mt-1 text-fine text-wafer-700">
      <span className="font-semibold">Boundary bounds in this stack: </span>
      {groups.map((g, k) => (
        <span key={`${g.kind}|${g.reason ?? ''}`} data-bound-group={g.kind}>
          {k > 0 && '; '}
          <span className="num">{g.count}</span> {g.count === 1 ? 'site' : 'sites'} <BoundMark kind={g.kind} reason={g.reason ?? undefined} spoken={false} />
          {g.clause && ` — ${g.clause}`}
        </span>
      ))}
      .
    </p>
  );
}

/** The image-charge effect of the stack and the metal planes (only when the report carries it). */
export function ImageEffectSection({
  effect, document, target, bounds = [],
}: {
  effect: ImageEffectFigure;
  document: DesignDocument;
  target: number;
  /** the sites' bound kinds counted by reason (boundSummary), shown as `check` prints them */
  bounds?: readonly BoundGroup[];
}) {
  const pair = effect.worstVPair;
  return (
    <section aria-label="Image-charge effect" className="rounded-md border border-wafer-200 px-3 py-2">
      <h3 className="text-fine font-semibold text-wafer-600">Image-charge effect of the stack and metal planes</h3>
      <dl className="num mt-1 grid gap-2 sm:grid-cols-2">
        <div>
          <dt className="text-fine text-wafer-600">Worst ΔU/U</dt>
          <dd>
            <span className="text-lead font-bold text-wafer-900">{signedPercent(effect.worstURel)}</span>
            {effect.worstUSite !== null && <span className="text-fine text-wafer-600"> at site {siteName(effect.worstUSite, document)}</span>}
          </dd>
        </div>
        <div>
          <dt className="text-fine text-wafer-600">Worst ΔV/V</dt>
          <dd>
            <span className="text-lead font-bold text-wafer-900">{signedPercent(effect.worstVRel)}</span>
            {pair && (
              <span className="text-fine text-wafer-600">
                {' '}
                for pair {siteName(pair[0], document)}–{siteName(pair[1], document)}
              </span>
            )}
          </dd>
        </div>
      </dl>
      <p className="mt-1 text-fine text-wafer-700">{imageEffectMeaning(effect, target)}</p>
      <p className="num text-fine text-wafer-600">
        Against an infinite host of εr {document.host.epsilonR}; image series tail below {meV(effect.tailBoundEv)}; largest share of a density across an interface {percent(effect.maxLeak)}.
      </p>
      {bounds.length > 0 && <BoundSummary groups={bounds} />}
      {effect.findings.length > 0 && (
        <ul aria-label="Image-charge notes" className="mt-1 list-disc space-y-0.5 pl-4 text-fine text-wafer-700">
          {effect.findings.map((f, k) => (
            <li key={`${f.code}-${f.index ?? ''}-${k}`}>{findingText(f, document)}</li>
          ))}
        </ul>
      )}
    </section>
  );
}

function Body({ report, document, readOnly, onApplyRecommended, elementsPending }: Omit<FarFieldPanelProps, 'computing' | 'error'> & { report: FarFieldReport }) {
  const target = report.tolerance;
  const u = worstU(report);
  const v = worstV(report);
  const { halfExtentsNm: half, boundary } = document.domain;
  const rec = report.recommendedHalfExtentsNm;
  const recOk = rec.every(Number.isFinite);
  const same = recOk && rec.every((x, k) => Math.abs(x - half[k]) <= 1e-9 * Math.max(1, x));
  const imageEffect = imageEffectOf(report);
  const bounds = useMemo(() => boundSummary(report.sites), [report.sites]);
  const estimatedSites = bounds.reduce((n, g) => n + (g.kind === 'estimated' ? g.count : 0), 0);
  const device = Boolean(document.host.layers || document.electrodes);
  return (
    <div className="space-y-4">
      <div>
        <dl className="grid gap-2 sm:grid-cols-2">
          <Headline label="Worst bound on U" what="on-site energy" figure={u} target={target} />
          <Headline label="Worst bound on V" what="between sites" figure={v} target={target} />
        </dl>
        <p className="mt-1.5 text-fine text-wafer-600">
          For the domain box of half-extents <span className="num">{half.map((x) => x.toPrecision(4)).join(' × ')} nm</span> with {boundaryWords(boundary)}; relative to
          each site&apos;s U and each pair&apos;s V in this model.
        </p>
        {estimatedSites > 0 && (
          <p className="mt-1 text-fine text-wafer-700" data-testid="estimated-bounds-note">
            <span className="num">{estimatedSites}</span> of <span className="num">{report.sites.length}</span> site bounds are <BoundMark kind="estimated" reason={undefined} /> rather than
            rigorous; the Bound column of the per-site figures says which and why.
          </p>
        )}
      </div>

      {imageEffect && <ImageEffectSection effect={imageEffect} document={document} target={target} bounds={bounds} />}

      <div className="rounded-md border border-wafer-200 px-3 py-2">
        <h3 className="text-fine font-semibold text-wafer-600">Smallest domain box meeting the target</h3>
        <p className="num mt-0.5 text-body text-wafer-900">
          {recOk ? `${rec.map((x) => x.toPrecision(4)).join(' × ')} nm (half-extents about the current centre)` : 'no box size meets the target'}
        </p>
        <p className="num text-fine text-wafer-600">
          Graded mesh for that box:{' '}
          {!recOk ? '—' : elementsPending || report.elementsEstimate === null ? 'estimating…' : `${report.elementsEstimateIsLowerBound ? 'more than' : 'about'} ${report.elementsEstimate.toLocaleString('en-US')} elements (budget ${document.refinement.maxElements.toLocaleString('en-US')} elements)`}
        </p>
        {!readOnly && (
          <Button className="mt-2" variant="secondary" disabled={!recOk || same} onClick={() => onApplyRecommended([rec[0], rec[1], rec[2]])}>
            Apply recommended size
          </Button>
        )}
      </div>

      <div>
        <h3 className="mb-1 text-fine font-semibold text-wafer-600">Warnings</h3>
        <Warnings warnings={report.warnings} />
      </div>

      <Figures report={report} />

      <details className="text-fine text-wafer-700">
        <summary className="cursor-pointer font-semibold">What the model assumes</summary>
        <ul className="mt-1 list-disc space-y-0.5 pl-5">
          {report.assumptions.map((a) => (
            <li key={a}>{a}</li>
          ))}
        </ul>
      </details>
      <EstimateNote
        assumptions={
          device
            ? "Bounds cover only the domain box's boundary condition, for effective-mass envelopes; the image-charge figures treat the layers as flat, infinite in x and y, and only electrodes spanning the box's cross-section as metal planes."
            : "Bounds cover only the domain box's boundary condition, for effective-mass envelopes in a homogeneous host."
        }
      />
    </div>
  );
}

export function FarFieldPanel(props: FarFieldPanelProps) {
  const id = useId();
  const { report, computing, error } = props;
  return (
    <section aria-labelledby={id} className="space-y-3 rounded-lg border border-wafer-200 bg-white p-4">
      <header className="flex items-baseline justify-between gap-3">
        <h2 id={id} className="text-lead font-bold text-wafer-900">
          Far-field check
        </h2>
        <p aria-live="polite" className="text-fine text-wafer-500">
          {computing ? 'updating…' : report ? 'up to date' : ''}
        </p>
      </header>
      {error && (
        <p role="alert" className="rounded-md border border-garnet-300 bg-garnet-50 px-2.5 py-1.5 text-note text-garnet-700">
          {error}
        </p>
      )}
      {report ? <Body {...props} report={report} /> : !error && <p className="text-note text-wafer-600">Working out the first check…</p>}
    </section>
  );
}
