/**
 * The live panel's numbers equal `npm run cli -- check --json` on the same document (issue 9).
 * The worker's core (app/src/features/studio/farfield/workerCore.ts, the code farfield.worker.ts
 * exposes) is run here in Node: once from a whole document, once after a sequence of edits sent
 * as changes, and its report, in the CLI's JSON shape (toCheckJson), must equal what the CLI
 * prints — same keys, same numbers, same warnings, same element estimate. The reference is the
 * command line itself (its physics is tested in tests/geometry/farfield and tests/geometry/design).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { DesignDocument } from '@contracts/design';
import { toCheckJson } from '../../server/cli/check';
import { createWorkerCore, estimateElementsFor } from '../../app/src/features/studio/farfield/workerCore';
import { unpackReport } from '../../app/src/features/studio/farfield/transport';
import { withElementEstimate, type FarFieldReport } from '../../geometry/farfield';
import { diffDesign } from '../../app/src/features/studio/farfield/diffDesign';
import { generateArray } from '../../geometry/arrays';
import { siteToNm, snapToLattice } from '../../geometry/lattice';
import type { Site, Vec3 } from '../../geometry/design/types';

const root = fileURLToPath(new URL('../..', import.meta.url));
const dir = mkdtempSync(join(tmpdir(), 'tetrawell-farfield-live-'));

function cliCheck(doc: DesignDocument, name: string): unknown {
  const file = join(dir, `${name}.json`);
  writeFileSync(file, JSON.stringify(doc));
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', 'check', file, '--json'], { cwd: root, encoding: 'utf8' });
  // 0: checked; 3: checked, with an error-level warning (the numbers are printed all the same)
  expect([0, 3], r.stderr).toContain(r.status);
  return JSON.parse(r.stdout);
}

/** What the panel shows once the element worker has answered (useFarField does the same). */
function withElements(bounds: FarFieldReport, doc: DesignDocument): FarFieldReport {
  const rec = bounds.recommendedHalfExtentsNm;
  return rec.every(Number.isFinite) ? withElementEstimate(bounds, estimateElementsFor(doc, rec), doc.refinement.maxElements) : bounds;
}

/** The JSON text both sides would print, read back: the comparison the user would make. */
const asPrinted = (x: unknown) => JSON.parse(JSON.stringify(x));

describe('live far-field check equals npm run cli -- check --json', () => {
  it('the README plaquette, sent whole', () => {
    const doc = JSON.parse(readFileSync(join(root, 'tests/fixtures/designs/plaquette.json'), 'utf8')) as DesignDocument;
    const core = createWorkerCore();
    // through the same packing the worker uses for its trip to the page
    const bounds = unpackReport(structuredClone(core.reset(doc)));
    const printed = cliCheck(doc, 'plaquette') as { recommendedElements: number | null };
    expect(printed.recommendedElements).toBeGreaterThan(0);
    expect(asPrinted(toCheckJson(withElements(bounds, doc)))).toEqual(printed);
  });

  it('a 9×9 array of 2-donor clusters (bond-graph pairs) after edits sent as changes', () => {
    const a = 0.5431020511; // CODATA 2018 lattice constant of Si (nm)
    const start: DesignDocument = {
      format: 'tetrawell-design',
      version: 1,
      name: 'Invented 9×9 cluster array',
      host: { material: 'Si', epsilonR: 11.7, latticeConstantNm: a },
      sites: generateArray({ kind: 'square', nx: 9, ny: 9, spacingNm: 4.4, clusterSize: 2, latticeConstantNm: a }),
      domain: { center: [0, 0, 0], halfExtentsNm: [30, 30, 15], boundary: { kind: 'multipole', order: 2 } },
      refinement: { order: 2, targetRelError: 1e-3, maxElements: 200_000 },
    };
    const core = createWorkerCore();
    let sent: DesignDocument | null = null;
    let bounds: FarFieldReport | null = null;
    const send = (doc: DesignDocument) => {
      const d = diffDesign(sent, doc);
      if (d.kind === 'reset') bounds = unpackReport(structuredClone(core.reset(d.design)));
      else if (d.kind === 'changes') bounds = unpackReport(structuredClone(core.apply(d.changes)));
      sent = doc;
    };
    send(start);
    // a drag of one site over three lattice steps, an electron removed, a site added, one deleted,
    // and the box shrunk until the boundary is too close
    let doc = start;
    const move = (i: number, dx: number): DesignDocument => {
      const s = doc.sites[i];
      const p: Vec3 = siteToNm(snapToLattice([s.position[0] + dx, s.position[1], s.position[2]], a), a);
      const sites = doc.sites.slice();
      sites[i] = { ...s, position: p };
      return { ...doc, sites };
    };
    for (let k = 0; k < 3; k++) send((doc = move(40, a / 2)));
    const sites = doc.sites.slice();
    sites[7] = { ...sites[7], electrons: 0 };
    const added: Site = { id: 'extra', species: 'As', electrons: 1, position: siteToNm(snapToLattice([24, 1, 0], a), a) };
    sites.push(added);
    sites.splice(12, 1);
    send((doc = { ...doc, sites }));
    send((doc = { ...doc, domain: { ...doc.domain, halfExtentsNm: [22, 22, 8] } }));
    if (!bounds) throw new Error('no report');
    const live = asPrinted(toCheckJson(withElements(bounds, doc)));
    const printed = cliCheck(doc, 'edited') as { warnings: { code: string }[]; pairs: unknown[] };
    // the edits reached the numbers: a too-close boundary and bond-graph pairs
    expect(printed.warnings.map((w) => w.code)).toEqual(expect.arrayContaining(['boundary-too-close', 'pairs-limited']));
    expect(live).toEqual(printed);
  });
});
