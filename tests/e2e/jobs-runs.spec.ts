/**
 * Server runs, the rest of issue 10's browser part: cancel a running job; a failed job says why in words; the
 * refinement sweep's log-log plot with its fitted rate; the element-order picker changes the job's options and the
 * element estimate; after a solve the mesh viewer colours by potential (V), V is drawn on the bond graph, and two
 * solves of different design versions are compared (what moved, the options, U and V differences).
 *
 * Sources of the checks:
 * - the refinement sweep: three levels each 8× the elements of the one before (every edge halved), as
 *   `npm run cli -- convergence --kind refinement` computes (tests/server/jobsConvergence.test.ts compares the numbers);
 *   the plot says the fitted rate the revision's summary holds, to 2 decimals;
 * - the moved site: Pythagoras (moved by (0, 0.5431020511, 0) nm, one lattice constant of Si, CODATA 2018
 *   a = 0.5431020511 nm, is 0.5431 nm);
 * - the job contract (issue 10): `options.order` is 1 or 2, `adaptive` applies to coulomb jobs only.
 * Screenshots land in tests/artifacts/jobs-*.png.
 */
import { expect, test, type Locator, type Page } from '@playwright/test';
import { readFileSync } from 'node:fs';
import { apiWrite, closeTestDb, createProject, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);
// meshing and solving on a shared two-core machine, plus software WebGL
test.describe.configure({ timeout: 480_000 });

type Doc = Record<string, unknown> & { sites: { id: string; position: number[]; electrons: number }[]; domain: Record<string, unknown>; refinement: Record<string, unknown> };
const PAIR = JSON.parse(readFileSync('tests/fixtures/designs/pair-coarse.json', 'utf8')) as Doc;

async function newDesign(page: Page, projectId: number, name: string, doc: Doc): Promise<number> {
  const res = await apiWrite(page.request, 'POST', `/api/projects/${projectId}/designs`, { name, document: { ...doc, name } });
  expect(res.status(), await res.text()).toBe(201);
  return ((await res.json()) as { design: { id: number } }).design.id;
}

async function openWorkspace(page: Page, projectId: number, designId: number) {
  await page.goto(`/projects/${projectId}/designs/${designId}`);
  await expect(page.getByRole('region', { name: 'Server runs' })).toBeVisible({ timeout: 30_000 });
}

const runs = (page: Page) => page.getByRole('region', { name: 'Server runs' });
const jobRow = (page: Page, title: RegExp) => runs(page).getByRole('list', { name: 'Recent runs of this design' }).getByRole('listitem', { name: title }).first();

/**
 * The workspace fills the window and its parts scroll on their own, so a full-page shot shows one window's worth: for
 * a look at a whole results region, make the window as tall as the page's content, shoot, and restore it.
 */
async function tallShot(page: Page, region: Locator, path: string) {
  const size = page.viewportSize()!;
  await page.setViewportSize({ width: size.width, height: 3200 });
  await region.scrollIntoViewIfNeeded();
  await region.screenshot({ path });
  await page.setViewportSize(size);
}

async function start(page: Page) {
  const email = uniqueEmail('runs2');
  await signUp(page, { email, name: 'Maren Okafor' });
  return createProject(page, 'Donor pair runs, part two (invented)');
}

test('the order picker sets the job’s order and the estimate; a running job is cancelled; a failed job says why', async ({ page }) => {
  const projectId = await start(page);
  // a tight target makes the solve long enough to be cancelled while it runs
  const heavy = await newDesign(page, projectId, 'Tight pair', { ...PAIR, refinement: { order: 1, targetRelError: 0.01, maxElements: 400000 } });
  await openWorkspace(page, projectId, heavy);
  const estimate = runs(page).getByLabel('Element estimate');
  await expect(estimate).toContainText('12 × 12 × 12 nm half-extents');
  await expect(estimate).toContainText(/with P1 elements: about [\d,]+ elements/, { timeout: 60_000 });
  const p1 = /about ([\d,]+) elements/.exec((await estimate.textContent()) ?? '')![1];
  await runs(page).getByRole('radio', { name: /P2/ }).check();
  await expect(estimate).toContainText(/with P2 elements: about [\d,]+ elements/, { timeout: 60_000 });
  const p2 = /about ([\d,]+) elements/.exec((await estimate.textContent()) ?? '')![1];
  // the graded mesh's size field depends on the order (geometry/mesh sizeFieldFromDesign): another count
  expect(p2).not.toBe(p1);

  await runs(page).getByRole('checkbox', { name: /Adaptive refinement/ }).check();
  await runs(page).getByRole('button', { name: 'Solve U and V' }).click();
  const solve = jobRow(page, /^U and V \(P2, adaptive\)/);
  await expect(solve.getByRole('status')).toHaveText('running', { timeout: 60_000 });
  const jobs = (await (await page.request.get(`/api/projects/${projectId}/jobs`)).json()) as { jobs: { id: number; kind: string; options: Record<string, unknown> }[] };
  expect(jobs.jobs[0]).toMatchObject({ kind: 'coulomb', options: { order: 2, adaptive: true } });
  await solve.getByRole('button', { name: 'Cancel' }).click();
  await expect(solve.getByRole('status')).toHaveText('cancelled', { timeout: 30_000 });
  await expect(solve.getByRole('button', { name: 'Cancel' })).toHaveCount(0);
  const after = (await (await page.request.get(`/api/projects/${projectId}/jobs/${jobs.jobs[0].id}`)).json()) as { job: { state: string; revisionId: number | null } };
  expect(after.job).toMatchObject({ state: 'cancelled', revisionId: null });
  await runs(page).scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'tests/artifacts/jobs-cancelled.png', fullPage: true });

  // a design with no electrons at all: the solver has nothing to solve and the job fails with its reason
  const empty = await newDesign(page, projectId, 'Ionised pair', { ...PAIR, sites: PAIR.sites.map((s) => ({ ...s, electrons: 0 })) });
  await openWorkspace(page, projectId, empty);
  await runs(page).getByRole('button', { name: 'Solve U and V' }).click();
  const failed = jobRow(page, /^U and V/);
  await expect(failed.getByRole('status')).toHaveText('failed', { timeout: 60_000 });
  await expect(failed).toContainText(/Why: .*electron/i);
  await runs(page).scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'tests/artifacts/jobs-failed.png', fullPage: true });
});

test('the refinement sweep draws error against unknowns on log-log axes with the fitted rate', async ({ page }) => {
  const projectId = await start(page);
  const design = await newDesign(page, projectId, 'Pair for a refinement sweep', {
    ...PAIR,
    domain: { ...PAIR.domain, halfExtentsNm: [8, 8, 8] },
    refinement: { order: 1, targetRelError: 0.5, maxElements: 400000 },
  });
  await openWorkspace(page, projectId, design);
  await runs(page).getByRole('radio', { name: /P1/ }).check();
  await runs(page).getByRole('button', { name: 'Refinement sweep' }).click();
  const sweep = jobRow(page, /^Convergence sweep \(P1, refinement levels\)/);
  await expect(sweep.getByRole('status')).toHaveText(/finished|failed/, { timeout: 240_000 });
  await expect(sweep.getByRole('status'), (await sweep.textContent()) ?? '').toHaveText('finished');
  const revs = (await (await page.request.get(`/api/projects/${projectId}/revisions?designId=${design}`)).json()) as { revisions: { id: number }[] };
  const rev = (await (await page.request.get(`/api/projects/${projectId}/revisions/${revs.revisions[0].id}`)).json()) as { revision: { options: unknown; summary: { fittedRate: number; rows: { elements: number }[] } } };
  expect(rev.revision.options).toEqual({ order: 1, sweep: 'refinement' });
  expect(rev.revision.summary.rows.map((r) => r.elements / rev.revision.summary.rows[0].elements)).toEqual([1, 8, 64]);
  const plot = runs(page).getByRole('figure', { name: 'Refinement sweep plot' });
  await expect(plot).toContainText('log-log');
  await expect(plot).toContainText(`Fitted rate: |ΔU| ∝ N−${rev.revision.summary.fittedRate.toFixed(2)}`);
  await expect(plot).toContainText('unknowns N (degrees of freedom)');
  await expect(plot).toContainText('|ΔU| (meV)');
  // two measured points and the fitted line on the chart
  await expect(plot.locator('.recharts-scatter-symbol')).toHaveCount(2);
  await expect(plot.locator('.recharts-line path.recharts-curve')).toHaveCount(1);
  await expect(runs(page).getByRole('complementary', { name: 'About these numbers' })).toBeVisible();
  await tallShot(page, runs(page).getByRole('region', { name: /Results of revision/ }), 'tests/artifacts/jobs-refinement-sweep.png');
});

test('after a solve: potential in the mesh viewer, V on the bond graph, and two design versions compared', async ({ page }) => {
  const projectId = await start(page);
  const design = await newDesign(page, projectId, 'Pair to compare', PAIR);
  await openWorkspace(page, projectId, design);
  await runs(page).getByRole('button', { name: 'Solve U and V' }).click();
  await expect(jobRow(page, /^U and V/).getByRole('status')).toHaveText('finished', { timeout: 150_000 });
  const results = runs(page).getByRole('region', { name: /Results of revision/ });
  const graph = results.getByRole('figure', { name: 'V on the bond graph' });
  await expect(graph).toContainText(/d1|d2/);
  await expect(graph).toContainText(/-?\d+\.\d ± \d+\.\d meV/);
  await expect(graph.getByRole('img', { name: 'Colour scale of V' })).toContainText('meV');
  // the viewer opens coloured by the potential, with the quantity and unit on the colour bar
  await expect(results.getByLabel('Colour by')).toHaveValue('potential', { timeout: 60_000 });
  const bar = results.getByRole('img', { name: 'Colour bar', exact: true });
  await expect(bar).toContainText('Potential');
  await expect(bar).toContainText(/\d V/);
  await expect(results.getByRole('figure', { name: 'Dihedral angle histogram' })).toContainText('180°');
  await expect(results.getByRole('figure', { name: 'Quality histogram' })).toContainText('mean ratio');
  const sizePlot = results.getByRole('figure', { name: 'Element size against distance to the nearest site' });
  await expect(sizePlot).toContainText('distance to nearest site (nm)');
  await expect(sizePlot.locator('.recharts-scatter-symbol').first()).toBeVisible();
  for (const [value, text] of [['size', 'longest edge (nm)'], ['quality', 'mean ratio'], ['level', 'Refinement level']] as const) {
    await results.getByLabel('Colour by').selectOption(value);
    await expect(bar).toContainText(text);
  }
  await results.getByLabel('Colour by').selectOption('potential');
  await results.getByLabel('Plane position (nm)').fill('1');
  await tallShot(page, results, 'tests/artifacts/jobs-potential.png');

  // move d2 by one lattice constant along y (a new design version) and solve again with P2
  const current = (await (await page.request.get(`/api/projects/${projectId}/designs/${design}`)).json()) as { design: { version: number; document: Doc } };
  const doc = current.design.document;
  const moved = { ...doc, sites: doc.sites.map((s) => (s.id === 'd2' ? { ...s, position: [s.position[0], s.position[1] + 0.5431020511, s.position[2]] } : s)) };
  const put = await apiWrite(page.request, 'PUT', `/api/projects/${projectId}/designs/${design}`, { document: moved, version: current.design.version });
  expect(put.status(), await put.text()).toBe(200);
  await page.reload();
  await expect(runs(page)).toBeVisible({ timeout: 30_000 });
  await runs(page).getByRole('radio', { name: /P2/ }).check();
  await runs(page).getByRole('button', { name: 'Solve U and V' }).click();
  await expect(jobRow(page, /^U and V \(P2\)/).getByRole('status')).toHaveText('finished', { timeout: 150_000 });

  await runs(page).locator('summary', { hasText: 'All stored results of this design' }).click();
  const stored = runs(page).getByRole('table', { name: 'Stored results' });
  await expect(stored.getByRole('checkbox')).toHaveCount(2);
  await stored.getByRole('checkbox').nth(1).check();
  await stored.getByRole('checkbox').nth(0).check();
  const compare = runs(page).getByRole('table', { name: /beside revision/ });
  await expect(compare.getByRole('row', { name: /Element order/ })).toContainText(/P1.*P2|P2.*P1/);
  await expect(compare.getByRole('row', { name: /Design version/ })).toContainText(/1.*2/);
  const v = compare.getByRole('row', { name: /^V d1–d2 \(meV\)/ });
  await expect(v).toContainText(/[+−]\d+\.\d{3} meV/);
  await expect(compare.getByRole('row', { name: /^U d1 \(meV\)/ })).toContainText(/[+−]\d+\.\d{3} meV/);
  await expect(runs(page).getByRole('list', { name: 'Design changes' })).toContainText('1 site moved: d2 by 0.5431 nm');
  await tallShot(page, runs(page).getByRole('region', { name: /beside revision/ }), 'tests/artifacts/jobs-compare-versions.png');
});
