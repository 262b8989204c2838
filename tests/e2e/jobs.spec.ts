/**
 * Server runs from the design workspace (issue 10, "Done when"): build a mesh and watch its progress reach 100 %,
 * follow it across a page reload, solve U and V and compare U with what the command line prints for the same
 * design document, download the .vtu, and check that a viewer cannot start a run.
 *
 * Sources of the checks:
 * - U against `npm run cli -- coulomb <document> --order N --json` run here on the design JSON read back from the
 *   API (the issue's own reference: the CLI is the numerical core's other caller); within the error bar shown, plus
 *   half a unit of the last shown digit (0.005 meV) for the rounding of the display;
 * - the .vtu file is a VTK XML UnstructuredGrid (VTK file formats, kitware.com, "XML File Formats": root element
 *   <VTKFile type="UnstructuredGrid">), with as many cells as the revision's summary says tetrahedra.
 * Screenshots land in tests/artifacts/jobs-*.png.
 */
import { expect, test, type Page } from '@playwright/test';
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { apiWrite, closeTestDb, createProject, signUp, testDb, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);
// meshing and solving on a shared two-core machine, plus software WebGL: room for each story
test.describe.configure({ timeout: 420_000 });

const run = promisify(execFile);
const fixture = JSON.parse(readFileSync('tests/fixtures/designs/pair-coarse.json', 'utf8')) as Record<string, unknown>;

async function newDesign(page: Page, projectId: number, name: string): Promise<{ id: number }> {
  const res = await apiWrite(page.request, 'POST', `/api/projects/${projectId}/designs`, { name, document: { ...fixture, name } });
  expect(res.status(), await res.text()).toBe(201);
  return ((await res.json()) as { design: { id: number } }).design;
}

async function openWorkspace(page: Page, projectId: number, designId: number) {
  await page.goto(`/projects/${projectId}/designs/${designId}`);
  await expect(page.getByRole('region', { name: 'Server runs' })).toBeVisible({ timeout: 30_000 });
}

const runs = (page: Page) => page.getByRole('region', { name: 'Server runs' });
const jobRow = (page: Page, title: RegExp) => runs(page).getByRole('list', { name: 'Recent runs of this design' }).getByRole('listitem', { name: title }).first();

test('build a mesh, solve U and V like the CLI, download the .vtu; a viewer cannot start a run', async ({ page, browser }) => {
  const email = uniqueEmail('runs');
  await signUp(page, { email, name: 'Ilse Brandt' });
  const projectId = await createProject(page, 'Donor pair runs (invented)');
  const design = await newDesign(page, projectId, 'Coarse pair for server runs');
  await openWorkspace(page, projectId, design.id);
  await expect(runs(page)).toContainText('Element estimate');
  await expect(runs(page)).toContainText(/about [\d,]+ elements/, { timeout: 60_000 });

  // --- build the mesh; reload while it runs: the run is listed again and followed to the end
  await runs(page).getByRole('button', { name: 'Build mesh' }).click();
  const mesh = jobRow(page, /^Mesh/);
  await expect(mesh).toBeVisible();
  await page.reload();
  await expect(jobRow(page, /^Mesh/)).toBeVisible({ timeout: 30_000 });
  await expect(jobRow(page, /^Mesh/).getByRole('status')).toHaveText('finished', { timeout: 120_000 });
  await expect(jobRow(page, /^Mesh/).getByRole('progressbar')).toHaveAttribute('aria-valuenow', '100');
  await page.screenshot({ path: 'tests/artifacts/jobs-mesh.png', fullPage: true });

  // --- solve U and V
  await runs(page).getByRole('button', { name: 'Solve U and V' }).click();
  const solve = jobRow(page, /^U and V/);
  await expect(solve.getByRole('status')).toHaveText('finished', { timeout: 150_000 });
  const uTable = runs(page).getByRole('table', { name: 'U per site' });
  await expect(uTable).toBeVisible();
  await expect(uTable.getByRole('columnheader', { name: /U \(meV\)/ })).toBeVisible();
  await expect(runs(page).getByRole('table', { name: 'V per pair' })).toBeVisible();
  await expect(runs(page).getByRole('complementary', { name: 'About these numbers' })).toBeVisible();
  await runs(page).scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'tests/artifacts/jobs-results.png', fullPage: true });

  // the same document through the command line
  const saved = (await (await page.request.get(`/api/projects/${projectId}/designs/${design.id}`)).json()) as { design: { document: { refinement: { order: number } } } };
  const dir = mkdtempSync(join(tmpdir(), 'tw-jobs-e2e-'));
  const file = join(dir, 'design.json');
  writeFileSync(file, JSON.stringify(saved.design.document));
  const order = saved.design.document.refinement.order;
  const cli = await run(process.execPath, ['--import', 'tsx', 'server/cli/index.ts', 'coulomb', file, '--order', String(order), '--json'], { timeout: 150_000, maxBuffer: 1 << 24 });
  const printed = JSON.parse(cli.stdout) as { sites: { id: string; uEv: number; uErrorEv: number }[] };
  for (const site of printed.sites) {
    const row = uTable.getByRole('row').filter({ has: page.getByRole('cell', { name: site.id, exact: true }) });
    const cells = await row.getByRole('cell').allTextContents();
    const uMeV = Number(cells[1]);
    const errMeV = Number(cells[2]);
    expect(Number.isFinite(uMeV) && Number.isFinite(errMeV), `U cells of ${site.id}: ${cells.join(' | ')}`).toBe(true);
    expect(Math.abs(uMeV - site.uEv * 1000), `U of ${site.id}: screen ${uMeV} ± ${errMeV} meV, CLI ${site.uEv * 1000} meV`).toBeLessThanOrEqual(errMeV + 0.005);
  }

  // sorting by U turns the order of the rows (two equal sites would not show it: sort by id descending instead)
  await uTable.getByRole('button', { name: /^Site/ }).click();
  await uTable.getByRole('button', { name: /^Site/ }).click();
  await expect(uTable.getByRole('columnheader', { name: /Site/ })).toHaveAttribute('aria-sort', 'descending');
  await expect(uTable.getByRole('row').nth(1).getByRole('cell').first()).toHaveText('d2');

  // --- download the mesh as VTK XML
  await jobRow(page, /^Mesh/).getByRole('button', { name: 'Show results' }).click();
  const meshResults = runs(page).getByRole('region', { name: /Results of revision/ });
  await expect(meshResults).toContainText('Tetrahedra');
  // the viewer: elements cut by the plane; moving the plane to the box edge (12 nm, the fixture's half-extent) cuts fewer
  const cutText = meshResults.getByText(/tetrahedra cut by the plane/);
  await expect(cutText).toContainText('x = 0.00 nm', { timeout: 30_000 });
  const cutAt = async () => Number(/^([\d,]+) of/.exec((await cutText.textContent()) ?? '')![1].replace(/,/g, ''));
  const centreCut = await cutAt();
  expect(centreCut).toBeGreaterThan(0);
  await meshResults.getByLabel('Plane position (nm)').fill('11');
  await expect(cutText).toContainText(/x = 1[01]\.\d\d nm/);
  // graded towards the donors (|x| ≈ 1.09 nm): fewer, larger elements near the wall than through the centre
  expect(await cutAt()).toBeLessThan(centreCut);
  await expect(meshResults.getByRole('img', { name: 'Colour bar' })).toBeVisible();
  await meshResults.getByLabel('Plane position (nm)').fill('1');
  await meshResults.scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'tests/artifacts/jobs-mesh-viewer.png', fullPage: true });
  const [download] = await Promise.all([page.waitForEvent('download'), meshResults.getByRole('link', { name: 'mesh.vtu' }).click()]);
  expect(download.suggestedFilename()).toMatch(/\.vtu$/);
  const vtu = readFileSync(await download.path(), 'utf8');
  expect(vtu).toMatch(/<VTKFile[^>]*type="UnstructuredGrid"/);
  const revs = (await (await page.request.get(`/api/projects/${projectId}/revisions?designId=${design.id}`)).json()) as { revisions: { id: number; kind: string }[] };
  const meshRev = revs.revisions.find((r) => r.kind === 'mesh')!;
  const detail = (await (await page.request.get(`/api/projects/${projectId}/revisions/${meshRev.id}`)).json()) as { revision: { summary: { tets: number } } };
  expect(vtu).toContain(`NumberOfCells="${detail.revision.summary.tets}"`);

  // --- the stored results list and two revisions side by side (same design content: the same hash on both sides)
  await runs(page).locator('summary', { hasText: 'All stored results of this design' }).click();
  const stored = runs(page).getByRole('table', { name: 'Stored results' });
  await expect(stored.getByRole('checkbox')).toHaveCount(2);
  await stored.getByRole('checkbox').nth(0).check();
  await stored.getByRole('checkbox').nth(1).check();
  const compare = runs(page).getByRole('table', { name: /beside revision/ });
  const hashRow = compare.getByRole('row', { name: /sha256/ });
  const hashes = await hashRow.getByRole('cell').allTextContents();
  expect(hashes[0]).toMatch(/^[0-9a-f]{12}$/);
  expect(hashes[1]).toBe(hashes[0]);
  await compare.scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'tests/artifacts/jobs-compare.png', fullPage: true });

  // --- a viewer sees the runs but no start or cancel buttons, and the server refuses a start
  const viewerEmail = uniqueEmail('runs-viewer');
  const ctx = await browser.newContext();
  const viewer = await ctx.newPage();
  await signUp(viewer, { email: viewerEmail, name: 'Pavel Novak' });
  const user = await testDb()('users').whereRaw('lower(email) = ?', [viewerEmail.toLowerCase()]).first('id');
  await testDb()('memberships').insert({ project_id: projectId, user_id: user.id, role: 'viewer' });
  await openWorkspace(viewer, projectId, design.id);
  await expect(jobRow(viewer, /^U and V/)).toBeVisible();
  for (const name of ['Build mesh', 'Solve U and V', 'Refinement sweep', 'Box sweep', 'Cancel'])
    await expect(runs(viewer).getByRole('button', { name })).toHaveCount(0);
  await expect(runs(viewer)).toContainText('editors and owners start and cancel them');
  const refused = await apiWrite(viewer.request, 'POST', `/api/projects/${projectId}/designs/${design.id}/jobs`, { kind: 'mesh', options: {} });
  expect(refused.status()).toBe(403);
  await viewer.screenshot({ path: 'tests/artifacts/jobs-viewer.png', fullPage: true });
  await ctx.close();
});

test('a box sweep draws U against the box size for grounded and multipole walls', async ({ page }) => {
  // (the refinement sweep multiplies the elements by 8 per level: too heavy for a browser test on two shared cores)
  const email = uniqueEmail('sweep');
  await signUp(page, { email, name: 'Ilse Brandt' });
  const projectId = await createProject(page, 'Donor pair sweep (invented)');
  const design = await newDesign(page, projectId, 'Coarse pair sweep');
  await openWorkspace(page, projectId, design.id);
  await runs(page).getByRole('button', { name: 'Box sweep' }).click();
  const sweep = jobRow(page, /^Convergence sweep/);
  await expect(sweep.getByRole('status')).toHaveText(/finished|failed/, { timeout: 200_000 });
  await expect(sweep.getByRole('status'), (await sweep.textContent()) ?? '').toHaveText('finished');
  const plot = runs(page).getByRole('figure', { name: 'Box sweep plot' });
  await expect(plot).toContainText('box half-width (nm)');
  await expect(plot).toContainText('U (meV)');
  await expect(plot).toContainText('grounded walls');
  await expect(plot).toContainText(/multipole.* walls/);
  await plot.scrollIntoViewIfNeeded();
  await page.screenshot({ path: 'tests/artifacts/jobs-sweep.png', fullPage: true });
});
