/**
 * "Server runs": the design's computations on the server. Start a mesh, a U and V solve or one of the two convergence
 * sweeps (POST …/jobs for the design's saved version), follow each job's phase and progress (event stream, polling
 * when it is cut; the list is read from the server, so a reload finds running jobs again), cancel it, read why it
 * failed, and open its revision: results, plots and downloads. Viewers see the jobs and results, not the buttons.
 * The element order (P1/P2) and, for U and V, adaptive refinement are picked before a start; the element estimate
 * shown is the one the server checks: the document's own box with the picked order.
 */
import { lazy, Suspense, useState } from 'react';
import type { Job, Revision } from '@contracts/api';
import type { DesignDocument } from '@contracts/design';
import { Button } from '../../components/Button';
import { Loading } from '../../components/QueryState';
import { ApiError } from '../../lib/api';
import { formatDateTime } from '../../lib/format';
import { useCancelJob } from './cancelJob';
import { CompareRevisions } from './CompareRevisions';
import { BondGraph } from './BondGraph';
import { CoulombResults } from './CoulombTable';
import { DeviceResults } from './DeviceResults';
import { hasDeviceResults } from './deviceRows';
import { useDesignVersion } from './getDesignVersion';
import { useRevision } from './getRevision';
import { useJobEvents } from './jobEvents';
import { isActive, useJobs } from './listJobs';
import { useRevisions } from './listRevisions';
import { revisionFileHref } from './revisionFile';
import { useStartJob } from './startJob';
import { actionBodies } from './runActions';
import { runEstimateText, useRunEstimate } from './useRunEstimate';
import { coulombSummarySchema, convergenceSummarySchema, KIND_LABEL, meshSummarySchema, optionsText } from './summaries';

const MeshViewer = lazy(() => import('./MeshViewer'));
const ConvergenceResults = lazy(() => import('./ConvergencePlot').then((m) => ({ default: m.ConvergenceResults })));

export interface RunsSectionProps {
  projectId: number;
  designId: number;
  canRun: boolean;
  /** the open document has edits the server does not have yet: a job would compute the last saved version */
  unsaved: boolean;
  /** the open document: its box and refinement give the element estimate shown before a start */
  document: DesignDocument;
}

const STATE_TEXT: Record<Job['state'], string> = { queued: 'waiting for a worker', running: 'running', succeeded: 'finished', failed: 'failed', cancelled: 'cancelled' };

function jobTitle(j: Pick<Job, 'kind' | 'options'>) {
  const o = optionsText(j.kind, j.options);
  return `${KIND_LABEL[j.kind]}${o ? ` (${o})` : ''}`;
}

function JobRow({ projectId, job, canRun, selected, onShow }: { projectId: number; job: Job; canRun: boolean; selected: boolean; onShow: (revisionId: number) => void }) {
  useJobEvents(projectId, job);
  const cancel = useCancelJob(projectId);
  const pct = job.state === 'succeeded' ? 100 : Math.round(job.progress.fraction * 100);
  const active = isActive(job);
  const label = `${jobTitle(job)}, job ${job.id}`;
  return (
    <li aria-label={label} className={`space-y-1 rounded-md border px-2 py-1.5 ${selected ? 'border-phosphor-500 bg-phosphor-50' : 'border-wafer-200'}`}>
      <div className="flex flex-wrap items-center gap-x-3 gap-y-1 text-note">
        <span className="font-semibold">{jobTitle(job)}</span>
        <span className="text-fine text-wafer-600">
          design version {job.designVersion}, {formatDateTime(job.createdAt)}
          {job.reused ? ', answered by an earlier identical run' : ''}
        </span>
        <span role="status" aria-label={`State of job ${job.id}`} className={`text-fine font-semibold ${job.state === 'failed' ? 'text-garnet-700' : job.state === 'succeeded' ? 'text-phosphor-800' : 'text-wafer-700'}`}>
          {STATE_TEXT[job.state]}
        </span>
        <span className="ml-auto flex gap-1.5">
          {active && canRun && (
            <Button variant="danger" className="py-1" disabled={cancel.isPending} onClick={() => cancel.mutate(job.id)}>
              Cancel
            </Button>
          )}
          {job.state === 'succeeded' && job.revisionId !== null && (
            <Button variant="secondary" className="py-1" aria-pressed={selected} onClick={() => onShow(job.revisionId!)}>
              Show results
            </Button>
          )}
        </span>
      </div>
      {(active || job.state === 'succeeded') && (
        <div className="flex items-center gap-2">
          <div role="progressbar" aria-label={`Progress of job ${job.id}`} aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} aria-valuetext={`${pct} %, ${job.progress.phase}`} className="h-2 flex-1 overflow-hidden rounded bg-wafer-200">
            <div className="h-full bg-phosphor-600 transition-[width]" style={{ width: `${pct}%` }} />
          </div>
          <span className="num w-40 text-fine text-wafer-700">
            {pct} % · {job.progress.phase}
            {job.progress.level !== undefined ? `, level ${job.progress.level}` : ''}
            {job.progress.site ? `, site ${job.progress.site}` : ''}
          </span>
        </div>
      )}
      {job.state === 'failed' && <p className="text-fine text-garnet-700">Why: {job.error ?? 'the server gave no reason.'}</p>}
      {cancel.error && <p role="alert" className="text-fine text-garnet-700">{cancel.error.message}</p>}
    </li>
  );
}

function bytes(n: number) {
  return n >= 1 << 20 ? `${(n / (1 << 20)).toFixed(1)} MiB` : n >= 1024 ? `${(n / 1024).toFixed(1)} KiB` : `${n} B`;
}

function Downloads({ projectId, revision }: { projectId: number; revision: Pick<Revision, 'id' | 'files'> }) {
  return (
    <ul aria-label={`Files of revision ${revision.id}`} className="flex flex-wrap gap-x-3 gap-y-0.5 text-fine">
      {revision.files.map((f) => (
        <li key={f.name}>
          <a href={revisionFileHref(projectId, revision.id, f.name)} download className="font-semibold text-phosphor-700 hover:underline">
            {f.name}
          </a>{' '}
          <span className="num text-wafer-500">({bytes(f.bytes)})</span>
        </li>
      ))}
    </ul>
  );
}

function RevisionResults({ projectId, revisionId }: { projectId: number; revisionId: number }) {
  const q = useRevision(projectId, revisionId);
  if (q.isPending) return <Loading label="Reading the results…" />;
  if (q.isError) return <p role="alert" className="text-note text-garnet-700">Could not read revision {revisionId}: {q.error.message}</p>;
  return <RevisionBody projectId={projectId} r={q.data} />;
}

function RevisionBody({ projectId, r }: { projectId: number; r: Revision }) {
  const design = useDesignVersion(projectId, r.designId, r.designVersion);
  const sites = design.data ? design.data.document.sites : null;
  const positions = sites ? sites.map((x) => x.position) : null;
  let body: React.ReactNode;
  if (r.kind === 'coulomb') {
    const s = coulombSummarySchema.safeParse(r.summary);
    const withMesh = r.files.some((f) => f.name === 'mesh.twmesh');
    body = s.success ? (
      <div className="space-y-3">
        <CoulombResults summary={s.data} device={Boolean(design.data?.document.host.layers || design.data?.document.electrodes)} />
        {hasDeviceResults(s.data) && <DeviceResults summary={s.data} design={design.data?.document ?? null} />}
        {sites ? <BondGraph summary={s.data} sites={sites} /> : design.isError ? <p role="alert" className="text-note text-garnet-700">The design version could not be read for the bond graph: {design.error.message}</p> : <Loading label="Reading the sites…" />}
        {withMesh ? (
          <Suspense fallback={<Loading label="Loading the mesh viewer…" />}>
            <MeshViewer projectId={projectId} revisionId={r.id} sites={positions} withPotential={r.files.some((f) => f.name === 'potential.f64')} />
          </Suspense>
        ) : (
          <p className="text-fine text-wafer-600">This solve stored no mesh (it ran before meshes were kept with solves): run it again to see the potential.</p>
        )}
      </div>
    ) : (
      <p className="text-note text-garnet-700">These results are in a shape this page does not know; download results.json instead.</p>
    );
  } else if (r.kind === 'convergence') {
    const s = convergenceSummarySchema.safeParse(r.summary);
    body = s.success ? (
      <Suspense fallback={<Loading label="Loading the plot…" />}>
        <ConvergenceResults summary={s.data} />
      </Suspense>
    ) : (
      <p className="text-note text-garnet-700">This sweep is in a shape this page does not know; download results.json instead.</p>
    );
  } else {
    const s = meshSummarySchema.safeParse(r.summary);
    body = s.success ? (
      <div className="space-y-2">
            <dl className="num grid grid-cols-2 gap-x-4 gap-y-0.5 text-note md:grid-cols-3">
        <div><dt className="text-fine text-wafer-600">Vertices</dt><dd>{s.data.vertices.toLocaleString('en-US')}</dd></div>
        <div><dt className="text-fine text-wafer-600">Tetrahedra</dt><dd>{s.data.tets.toLocaleString('en-US')}</dd></div>
        <div><dt className="text-fine text-wafer-600">P2 nodes</dt><dd>{s.data.p2Nodes.toLocaleString('en-US')}</dd></div>
        <div><dt className="text-fine text-wafer-600">Dihedral angles (degrees)</dt><dd>{s.data.minDihedralDeg.toFixed(1)}° to {s.data.maxDihedralDeg.toFixed(1)}°</dd></div>
        <div><dt className="text-fine text-wafer-600">Volume (nm³)</dt><dd>{s.data.volumeNm3.toPrecision(4)} nm³</dd></div>
      </dl>
      <Suspense fallback={<Loading label="Loading the mesh viewer…" />}>
        <MeshViewer projectId={projectId} revisionId={r.id} sites={positions} />
      </Suspense>
      </div>
    ) : (
      <p className="text-note text-garnet-700">This mesh summary is in a shape this page does not know.</p>
    );
  }
  return (
    <section aria-label={`Results of revision ${r.id}`} className="space-y-2 rounded-md border border-wafer-200 p-2">
      <h3 className="text-note font-bold">
        Revision {r.id}: {jobTitle(r)} of design version {r.designVersion}
      </h3>
      <p className="text-fine text-wafer-600">
        Computed {formatDateTime(r.createdAt)}
        {r.createdBy ? ` for ${r.createdBy}` : ''} by Tetrawell {r.software.version}
        {r.software.commit ? ` (${r.software.commit.slice(0, 10)})` : ''}
        {r.timings.totalSeconds !== undefined ? ` in ${r.timings.totalSeconds.toFixed(1)} s` : ''}.
      </p>
      <Downloads projectId={projectId} revision={r} />
      {body}
    </section>
  );
}

function RevisionList({ projectId, designId, shown, onShow }: { projectId: number; designId: number; shown: number | null; onShow: (id: number) => void }) {
  const q = useRevisions(projectId, designId);
  const [picked, setPicked] = useState<number[]>([]);
  const toggle = (id: number) => setPicked((p) => (p.includes(id) ? p.filter((x) => x !== id) : [...p, id].slice(-2)));
  if (q.isPending) return <Loading label="Reading the revisions…" />;
  if (q.isError) return <p role="alert" className="text-note text-garnet-700">Could not list the revisions: {q.error.message}</p>;
  if (q.data.length === 0) return <p className="text-fine text-wafer-600">No stored results yet.</p>;
  return (
    <div className="space-y-2">
    <table aria-label="Stored results" className="num w-full text-note">
      <thead>
        <tr className="border-b border-wafer-200 text-left">
          <th className="px-1.5 py-1">Revision</th>
          <th className="px-1.5 py-1">What</th>
          <th className="px-1.5 py-1">Design version</th>
          <th className="px-1.5 py-1">Computed</th>
          <th className="px-1.5 py-1">Files</th>
          <th className="px-1.5 py-1">Compare</th>
        </tr>
      </thead>
      <tbody>
        {q.data.map((r) => (
          <tr key={r.id} className={`border-b border-wafer-100 ${shown === r.id ? 'bg-phosphor-50' : ''}`}>
            <td className="px-1.5 py-0.5">
              <button type="button" className="font-semibold text-phosphor-700 hover:underline" aria-pressed={shown === r.id} onClick={() => onShow(r.id)}>
                {r.id}
              </button>
            </td>
            <td className="px-1.5 py-0.5">{jobTitle(r)}</td>
            <td className="px-1.5 py-0.5">{r.designVersion}</td>
            <td className="px-1.5 py-0.5">{formatDateTime(r.createdAt)}</td>
            <td className="px-1.5 py-0.5">
              <Downloads projectId={projectId} revision={r} />
            </td>
            <td className="px-1.5 py-0.5">
              <input type="checkbox" aria-label={`Compare revision ${r.id}`} checked={picked.includes(r.id)} onChange={() => toggle(r.id)} />
            </td>
          </tr>
        ))}
      </tbody>
    </table>
    {picked.length === 2 ? <CompareRevisions projectId={projectId} ids={[picked[0], picked[1]]} /> : <p className="text-fine text-wafer-600">Tick two revisions to see them side by side.</p>}
    </div>
  );
}

export function RunsSection({ projectId, designId, canRun, unsaved, document }: RunsSectionProps) {
  const jobs = useJobs(projectId);
  const [picked, setPicked] = useState<1 | 2 | null>(null);
  const order = picked ?? document.refinement.order;
  const [adaptive, setAdaptive] = useState(false);
  const estimate = runEstimateText(useRunEstimate(document, order));
  const start = useStartJob(projectId, designId);
  const [shown, setShown] = useState<number | null>(null);
  const mine = (jobs.data ?? []).filter((j) => j.designId === designId).slice(0, 8);
  // with nothing picked, show the newest finished result
  const revisionId = shown ?? mine.find((j) => j.state === 'succeeded' && j.revisionId !== null)?.revisionId ?? null;
  const startError = start.error instanceof ApiError || start.error instanceof Error ? start.error.message : null;
  return (
    <section aria-label="Server runs" className="space-y-3 rounded-md bg-white p-3">
      <header className="flex flex-wrap items-baseline gap-x-3">
        <h2 className="text-lead font-bold">Server runs</h2>
        <p className="text-fine text-wafer-600">Meshes, U and V and convergence sweeps of the last saved version, computed by the server’s workers and stored as revisions.</p>
      </header>
      {canRun && (
        <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-note">
          <fieldset className="flex items-center gap-2">
            <legend className="float-left mr-2 font-semibold">Element order</legend>
            {([1, 2] as const).map((o) => (
              <label key={o} className="inline-flex items-center gap-1">
                <input type="radio" name={`order-${designId}`} checked={order === o} onChange={() => setPicked(o)} />
                P{o} {o === 1 ? '(linear)' : '(quadratic)'}
              </label>
            ))}
            {picked === null && <span className="text-fine text-wafer-600">the design’s default</span>}
          </fieldset>
          <label className="inline-flex items-center gap-1">
            <input type="checkbox" checked={adaptive} onChange={(e) => setAdaptive(e.target.checked)} />
            Adaptive refinement (U and V only)
          </label>
        </div>
      )}
      <p aria-label="Element estimate" className="num text-fine text-wafer-700">
        Element estimate for the design’s current box ({document.domain.halfExtentsNm.map((h) => +h.toFixed(3)).join(' × ')} nm half-extents) with P{order} elements: {estimate}. The server estimates the saved version again before it queues a run.
      </p>
      {canRun ? (
        <div className="space-y-1">
          <div role="group" aria-label="Start a run" className="flex flex-wrap gap-1.5">
            {actionBodies(order, adaptive).map((a) => (
              <Button key={a.label} variant={a.body.kind === 'convergence' ? 'secondary' : 'primary'} disabled={start.isPending || unsaved} onClick={() => start.mutate(a.body, { onSuccess: () => setShown(null) })}>
                {a.label}
              </Button>
            ))}
          </div>
          {unsaved && <p className="text-fine text-wafer-600">Saving your edits first: runs compute the saved version.</p>}
          {startError && (
            <p role="alert" className="text-note text-garnet-700">
              Not started: {startError}
            </p>
          )}
        </div>
      ) : (
        <p className="text-fine text-wafer-600">Viewers can read runs and results; editors and owners start and cancel them.</p>
      )}
      {jobs.isError && <p role="alert" className="text-note text-garnet-700">Could not read the runs: {jobs.error.message}</p>}
      {mine.length > 0 ? (
        <ol aria-label="Recent runs of this design" className="space-y-1.5">
          {mine.map((j) => (
            <JobRow key={j.id} projectId={projectId} job={j} canRun={canRun} selected={j.revisionId !== null && j.revisionId === revisionId} onShow={setShown} />
          ))}
        </ol>
      ) : (
        jobs.isSuccess && <p className="text-fine text-wafer-600">No runs of this design yet.</p>
      )}
      {revisionId !== null && <RevisionResults key={revisionId} projectId={projectId} revisionId={revisionId} />}
      <details>
        <summary className="cursor-pointer text-note font-semibold">All stored results of this design</summary>
        <div className="pt-2">
          <RevisionList projectId={projectId} designId={designId} shown={revisionId} onShow={setShown} />
        </div>
      </details>
    </section>
  );
}
