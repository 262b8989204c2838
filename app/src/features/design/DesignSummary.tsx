import { useMemo } from 'react';
import type { DesignDocument } from '@contracts/design';
import { SPECIES_PRESETS, resolveOrbital } from '../../../../geometry/design/presets';
import type { Orbital } from '../../../../geometry/design/types';
import { EstimateNote } from '../../components/EstimateNote';
import { Panel } from '../../components/Panel';
import { Loading, QueryError } from '../../components/QueryState';
import { formatDateTime, formatNm } from '../../lib/format';
import { useDesign } from './getDesign';
import { countBySpecies, nearestNeighbourDistances, smallestSeparation } from './siteSummary';

/** Rows shown in the read-only table; the full list belongs to the design editor of a later issue. */
const MAX_ROWS = 300;

function describeOrbital(o: Orbital): string {
  switch (o.model) {
    case 'hydrogenic-1s':
      return `hydrogenic 1s, a = ${formatNm(o.radiusNm, 2)} nm`;
    case 'anisotropic-1s':
      return `anisotropic 1s, a = ${formatNm(o.radiusNm, 2)} nm, b = ${formatNm(o.radiusZNm, 2)} nm`;
    case 'gaussian':
      return `Gaussian, σ = ${formatNm(o.sigmaNm, 2)} nm`;
  }
}

function Fact({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-fine font-semibold uppercase tracking-wide text-wafer-500">{term}</dt>
      <dd className="num mt-0.5 text-note text-wafer-900">{children}</dd>
    </div>
  );
}

function DesignBody({ design }: { design: DesignDocument }) {
  const shown = design.sites.slice(0, MAX_ROWS);
  const nn = useMemo(() => nearestNeighbourDistances(design.sites, MAX_ROWS), [design.sites]);
  const minSep = smallestSeparation(nn);
  const counts = countBySpecies(design.sites);
  const usesAnisotropic = design.sites.some((s) => resolveOrbital(s).model === 'anisotropic-1s');
  const usesPreset = design.sites.some((s) => !s.orbital);
  const { center, halfExtentsNm, boundary } = design.enclosure;

  return (
    <div className="space-y-5">
      <dl className="grid grid-cols-2 gap-4 md:grid-cols-4">
        <Fact term="Host">
          Si, ε<sub>r</sub> = {design.host.epsilonR}, a = {design.host.latticeConstantNm} nm
        </Fact>
        <Fact term="Sites">
          {design.sites.length} ({counts.map((c) => `${c.count} ${c.species}`).join(', ') || 'none'})
        </Fact>
        <Fact term="Domain box">
          box of half-size {halfExtentsNm.map((h) => formatNm(h, 1)).join(' × ')} nm about ({center.map((c) => formatNm(c, 2)).join(', ')}) nm;{' '}
          {boundary.kind === 'grounded' ? 'grounded walls' : `multipole boundary to order ${boundary.order}`}
        </Fact>
        <Fact term="Refinement">
          P{design.refinement.order} elements, target relative error {design.refinement.targetRelError}, at most {design.refinement.maxElements.toLocaleString()} elements
        </Fact>
      </dl>

      {design.sites.length === 0 ? (
        <p className="text-body text-wafer-600">This design has no sites yet.</p>
      ) : (
        <div className="overflow-x-auto rounded-md border border-wafer-200">
          <table className="num w-full text-left text-note [&_td]:whitespace-nowrap [&_th]:whitespace-nowrap">
            <caption className="sr-only">Sites of the design, positions in nanometres</caption>
            <thead className="bg-wafer-50 text-fine uppercase tracking-wide text-wafer-500">
              <tr>
                <th scope="col" className="px-3 py-2 font-semibold">Site</th>
                <th scope="col" className="px-3 py-2 font-semibold">Species</th>
                <th scope="col" className="px-3 py-2 text-right font-semibold">x <span className="normal-case">(nm)</span></th>
                <th scope="col" className="px-3 py-2 text-right font-semibold">y <span className="normal-case">(nm)</span></th>
                <th scope="col" className="px-3 py-2 text-right font-semibold">z <span className="normal-case">(nm)</span></th>
                <th scope="col" className="px-3 py-2 text-right font-semibold">Electrons</th>
                <th scope="col" className="px-3 py-2 text-right font-semibold">Nearest site <span className="normal-case">(nm)</span></th>
                <th scope="col" className="px-3 py-2 font-semibold">Orbital</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-wafer-100">
              {shown.map((s, i) => (
                <tr key={`${s.id}-${i}`}>
                  <th scope="row" className="px-3 py-1.5 font-semibold text-wafer-900">{s.id}</th>
                  <td className="px-3 py-1.5">
                    {s.species} <span className="text-wafer-500">({SPECIES_PRESETS[s.species].kind})</span>
                  </td>
                  <td className="px-3 py-1.5 text-right">{formatNm(s.position[0])}</td>
                  <td className="px-3 py-1.5 text-right">{formatNm(s.position[1])}</td>
                  <td className="px-3 py-1.5 text-right">{formatNm(s.position[2])}</td>
                  <td className="px-3 py-1.5 text-right">{s.electrons}</td>
                  <td className="px-3 py-1.5 text-right">{Number.isFinite(nn[i]) ? formatNm(nn[i]) : '—'}</td>
                  <td className="px-3 py-1.5">
                    {describeOrbital(resolveOrbital(s))}
                    {!s.orbital && <span className="ml-1.5 rounded bg-wafer-100 px-1.5 py-0.5 text-fine text-wafer-600">species preset</span>}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      {design.sites.length > MAX_ROWS && (
        <p className="text-note text-wafer-500">
          Showing the first {MAX_ROWS} of {design.sites.length} sites; nearest-site distances are measured against all of them.
        </p>
      )}
      {/* Two lattice constants as "close": a rule of thumb (common practice), not a sourced limit. */}
      {Number.isFinite(minSep) && minSep < 2 * design.host.latticeConstantNm && (
        <p role="note" className="rounded-md border border-ember-300 bg-ember-50 px-3 py-2 text-note text-ember-800">
          Two sites sit {formatNm(minSep)} nm apart, under two lattice constants. Envelope-function models of separate donors are least trustworthy at such distances.
        </p>
      )}
      <EstimateNote
        assumptions={
          [
            usesPreset ? `Orbitals marked “species preset” use the default envelope: ${SPECIES_PRESETS.P.orbitalSource}.` : '',
            usesAnisotropic ? 'The anisotropic envelope is a single-valley model; a real donor state sums six valleys and is nearly isotropic.' : '',
          ]
            .filter(Boolean)
            .join(' ') || undefined
        }
      />
    </div>
  );
}

export function DesignSummary({ projectId }: { projectId: number }) {
  const design = useDesign(projectId);
  return (
    <Panel
      title="Array sites"
      description={design.data ? `${design.data.design.name} · version ${design.data.version} · saved ${formatDateTime(design.data.updatedAt)}` : 'The dopant sites of this project’s design (read-only here).'}
    >
      {design.isPending && <Loading label="Loading the design…" />}
      {design.isError && <QueryError error={design.error} what="the design" onRetry={() => void design.refetch()} />}
      {design.data === null && <p className="text-body text-wafer-600">No design has been saved for this project yet.</p>}
      {design.data && <DesignBody design={design.data.design} />}
    </Panel>
  );
}
