/**
 * Dragging on the design canvas with real mouse events (SwiftShader WebGL): the move handle and a
 * domain-box face. The canvas' own test hook `window.__tetrawellCanvasProbe.toScreen` says where a
 * scene point (nm) is on the page, so the drags aim at the handles; everything after that is plain
 * mouse movement through three.js' own controls.
 *
 * Checks and their outside sources:
 * - Si lattice constant a = 0.5431020511 nm (CODATA 2018).
 * - Diamond lattice in a/4 units: FCC sites (all indices even, sum ≡ 0 mod 4) plus the same shifted
 *   by (1, 1, 1) (all odd, sum ≡ 3 mod 4) (Ashcroft & Mermin, ch. 4, the diamond structure; from
 *   memory). Checked here on its own, not through the app's lattice code.
 * - The nearest point of the FCC sublattice alone is never further than its covering radius a/2 (the
 *   octahedral hole at (a/2, 0, 0); Conway & Sloane, "Sphere Packings, Lattices and Groups", ch. 4,
 *   from memory), so a snapped site lies within a/2 of where the pointer took it.
 * - Distances are Euclidean; a point's clearance to an axis-aligned box it sits in is its smallest
 *   distance to a face (elementary geometry).
 * - three.js' TransformControls (examples/jsm/controls/TransformControls.js): the gizmo is scaled by
 *   d · min(1.9 · tan(fov/2), 7) · size / 4 at camera distance d, and its arrow picker spans 0 to
 *   0.6 of that along the axis; we aim at 0.4.
 * Screenshots: tests/artifacts/studio-drag-*.png.
 */
import { expect, test, type Page } from '@playwright/test';
import { apiWrite, closeTestDb, createProject, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);
test.describe.configure({ timeout: 150_000 });

const A = 0.5431020511;
type V3 = [number, number, number];

interface Detail {
  id: number;
  version: number;
  document: { sites: { id: string; species: string; position: number[]; electrons: number }[]; domain: { center: number[]; halfExtentsNm: number[] } } & Record<string, unknown>;
}

function isDiamondSite(i: number, j: number, k: number): boolean {
  if (![i, j, k].every(Number.isInteger)) return false;
  const s = (((i + j + k) % 4) + 4) % 4;
  const even = [i, j, k].every((n) => n % 2 === 0);
  const odd = [i, j, k].every((n) => Math.abs(n % 2) === 1);
  return (even && s === 0) || (odd && s === 3);
}

async function designWith(page: Page, projectId: number, name: string, sites: Detail['document']['sites'], halfExtentsNm: V3): Promise<Detail> {
  const first = await apiWrite(page.request, 'POST', `/api/projects/${projectId}/designs`, { name: 'Template' });
  expect(first.status()).toBe(201);
  const template = ((await first.json()) as { design: Detail }).design.document;
  const res = await apiWrite(page.request, 'POST', `/api/projects/${projectId}/designs`, {
    name,
    document: { ...template, name, sites, domain: { ...template.domain, center: [0, 0, 0], halfExtentsNm } },
  });
  expect(res.status(), await res.text()).toBe(201);
  return ((await res.json()) as { design: Detail }).design;
}

async function readDesign(page: Page, projectId: number, designId: number): Promise<Detail> {
  const res = await page.request.get(`/api/projects/${projectId}/designs/${designId}`);
  expect(res.status()).toBe(200);
  return ((await res.json()) as { design: Detail }).design;
}

async function toScreen(page: Page, p: V3) {
  return page.evaluate((q) => window.__tetrawellCanvasProbe!.toScreen(q), p);
}

async function openLookingDown(page: Page, projectId: number, designId: number) {
  await page.goto(`/projects/${projectId}/designs/${designId}`);
  await expect(page.locator('canvas')).toBeVisible({ timeout: 30_000 });
  await expect.poll(() => page.evaluate(() => typeof window.__tetrawellCanvasProbe?.toScreen), { timeout: 30_000 }).toBe('function');
  await page.getByRole('button', { name: 'Along [001]' }).click();
}

const table = (page: Page) => page.getByRole('table', { name: 'Sites' });
const panel = (page: Page) => page.getByRole('region', { name: 'Far-field check' });
const saveState = (page: Page) => page.getByRole('status', { name: 'Save state' });
// site table columns: Id, Species, Electrons, x, y, z (nm), Lattice i, j, k (a/4), Nearest site (nm), Orbital
const cellOf = (page: Page, id: string, col: number) => table(page).locator(`tr[data-site-id="${id}"]`).getByRole('cell').nth(col);

async function latticeOf(page: Page, id: string): Promise<V3> {
  const text = await cellOf(page, id, 6).innerText();
  return text.split(',').map((t) => Number(t.trim())) as V3;
}

/** The far-field figure of the one pair, R in nm as the panel prints it. */
async function pairDistanceText(page: Page): Promise<string> {
  const row = panel(page).getByRole('table', { name: 'Far-field figures per pair' }).locator('tbody tr').filter({ hasText: '–' }).first();
  return (await row.getByRole('cell').nth(1).innerText()).trim();
}

test('the move handle drags a site onto a lattice site; table and far-field check follow; undo puts it back', async ({ page }) => {
  await signUp(page, { email: uniqueEmail('ines'), name: 'Ines Marchetti' });
  const projectId = await createProject(page, 'Handle moves');
  // two P donors 8a apart along [100]: (0,0,0) and (32,0,0) in a/4 units, both diamond sites
  const start = [
    { id: 's1', species: 'P', position: [0, 0, 0], electrons: 1 },
    { id: 's2', species: 'P', position: [8 * A, 0, 0], electrons: 1 },
  ];
  const design = await designWith(page, projectId, 'Pair to move', start, [10, 10, 10]);
  const original = (await readDesign(page, projectId, design.id)).document;
  await openLookingDown(page, projectId, design.id);

  await panel(page).getByRole('button', { name: /^Per pair/ }).click();
  await expect.poll(() => pairDistanceText(page)).toBe(`${(8 * A).toPrecision(4)}`);

  await table(page).locator('tr[data-site-id="s1"]').click();
  await page.getByRole('radio', { name: /^Move/ }).click();
  await expect(page.getByText('1 selected')).toBeVisible();

  // aim at the X arrow of the handle, 0.4 gizmo units from the site along +x
  const centre = await toScreen(page, [0, 0, 0]);
  const fov = (40 * Math.PI) / 180; // the canvas camera's field of view (DesignCanvas), common practice
  const gizmo = (centre.distance * Math.min(1.9 * Math.tan(fov / 2), 7) * 0.8) / 4;
  const grip = await toScreen(page, [0.4 * gizmo, 0, 0]);
  const shiftNm = 2.1;
  const to = await toScreen(page, [shiftNm, 0, 0]);
  const dx = to.x - centre.x, dy = to.y - centre.y;
  expect(Math.abs(dx)).toBeGreaterThan(10); // the drag is many pixels long on this canvas

  await page.mouse.move(grip.x, grip.y);
  await page.mouse.down();
  for (let k = 1; k <= 12; k++) await page.mouse.move(grip.x + (dx * k) / 12, grip.y + (dy * k) / 12);
  // while the handle is held, the far-field check already works on the moved site (a preview)
  await expect.poll(() => pairDistanceText(page), { timeout: 20_000 }).not.toBe(`${(8 * A).toPrecision(4)}`);
  await page.screenshot({ path: 'tests/artifacts/studio-drag-move.png', fullPage: true });
  await page.mouse.up();

  // the table shows the moved site on a diamond-lattice site, within a/2 of where it was taken
  await expect(cellOf(page, 's1', 3)).not.toHaveText('0.000', { timeout: 20_000 });
  const [i, j, k] = await latticeOf(page, 's1');
  expect(isDiamondSite(i, j, k), `${i}, ${j}, ${k} is a diamond site`).toBe(true);
  await expect(table(page).locator('tr[data-site-id="s1"]')).not.toContainText('off lattice');
  const moved: V3 = [(i * A) / 4, (j * A) / 4, (k * A) / 4];
  expect(Math.hypot(moved[0] - shiftNm, moved[1], moved[2])).toBeLessThanOrEqual(A / 2 + 0.15); // + about one pixel of aim
  for (let n = 0; n < 3; n++) await expect(cellOf(page, 's1', 3 + n)).toHaveText(moved[n].toFixed(3));
  const r = Math.hypot(moved[0] - 8 * A, moved[1], moved[2]);
  await expect(cellOf(page, 's1', 7)).toHaveText(r.toFixed(3));
  await expect(cellOf(page, 's2', 7)).toHaveText(r.toFixed(3));
  // the far-field panel works on the committed document: R of the pair is the new distance
  await expect.poll(() => pairDistanceText(page)).toBe(r.toPrecision(4));

  // the save holds exactly the lattice position (a/4 multiples), the other site untouched
  await expect(saveState(page)).toContainText('Saved as version 2', { timeout: 15_000 });
  const saved = (await readDesign(page, projectId, design.id)).document;
  const s1 = saved.sites.find((s) => s.id === 's1')!;
  s1.position.forEach((x, n) => expect(x).toBeCloseTo(moved[n], 12));
  expect(saved.sites.find((s) => s.id === 's2')!.position).toEqual(start[1].position);

  // one undo restores the site, the table, the figure and (after the autosave) the stored document
  await page.getByRole('button', { name: 'Undo' }).click();
  await expect(cellOf(page, 's1', 3)).toHaveText('0.000');
  expect(await latticeOf(page, 's1')).toEqual([0, 0, 0]);
  await expect.poll(() => pairDistanceText(page)).toBe(`${(8 * A).toPrecision(4)}`);
  await expect(saveState(page)).toContainText('Saved as version 3', { timeout: 15_000 });
  expect((await readDesign(page, projectId, design.id)).document).toEqual(original);
});

test('dragging a domain-box face changes its half-extent in nm; shrinking it far enough raises the far-field warning', async ({ page }) => {
  await signUp(page, { email: uniqueEmail('joost'), name: 'Joost Arendse' });
  const projectId = await createProject(page, 'Box by hand');
  const design = await designWith(page, projectId, 'One donor', [{ id: 's1', species: 'P', position: [0, 0, 0], electrons: 1 }], [10, 10, 10]);
  await openLookingDown(page, projectId, design.id);
  const form = page.getByRole('form', { name: 'Domain box and refinement' });
  const halfX = form.getByLabel('Half-extent x (nm)');
  const tooClose = panel(page).locator('li[data-code="boundary-too-close"]');
  const clearance = panel(page).getByRole('table', { name: 'Far-field figures per site' }).locator('tbody tr').filter({ hasText: 's1' }).getByRole('cell');
  await expect(halfX).toHaveValue('10');
  await expect(panel(page)).toContainText('half-extents 10.00 × 10.00 × 10.00 nm');
  await expect(tooClose).toHaveCount(0);

  // grab the +x face handle at (10, 0, 0) nm and pull it in to 8 nm
  const grip = await toScreen(page, [10, 0, 0]);
  const at = async (h: number) => toScreen(page, [h, 0, 0]);
  const nmPerPx = 2 / Math.hypot((await at(8)).x - grip.x, (await at(8)).y - grip.y);
  await page.mouse.move(grip.x, grip.y);
  await page.mouse.down();
  let target = await at(8);
  await page.mouse.move(target.x, target.y, { steps: 6 });
  // during the drag the far-field check already works on the dragged box
  await expect(panel(page)).toContainText(/half-extents [78]\.\d{3} × 10\.00 × 10\.00 nm/, { timeout: 20_000 });
  await expect(halfX).toHaveValue('10'); // the form takes the size when the face is let go

  // keep pulling until the check says the boundary is too close (the face's drag, never released)
  let h = 8;
  while ((await tooClose.count()) === 0 && h > 1) {
    h -= 0.5;
    target = await at(h);
    await page.mouse.move(target.x, target.y, { steps: 2 });
    await expect(panel(page)).toContainText('up to date', { timeout: 20_000 });
  }
  await expect(tooClose).toBeVisible();
  await page.mouse.up();

  // the form shows the dragged half-extent in nm, y and z unchanged
  await expect.poll(async () => Number(await halfX.inputValue())).toBeLessThan(8);
  const hx = Number(await halfX.inputValue());
  expect(Math.abs(hx - h)).toBeLessThanOrEqual(0.01 + 2 * nmPerPx);
  await expect(form.getByLabel('Half-extent y (nm)')).toHaveValue('10');
  await expect(form.getByLabel('Half-extent z (nm)')).toHaveValue('10');
  // the site at the centre is hx from the nearest face; the check needs more than that
  await expect(panel(page)).toContainText(`half-extents ${hx.toPrecision(4)} × 10.00 × 10.00 nm`);
  await expect(clearance.nth(1)).toHaveText(hx.toPrecision(4));
  expect(Number(await clearance.nth(2).innerText())).toBeGreaterThan(hx);
  await expect(tooClose).toBeVisible();
  // a face drag is not a selection band: nothing got selected on the way
  await expect(page.getByText(/\d+ selected/)).toHaveCount(0);
  await page.screenshot({ path: 'tests/artifacts/studio-drag-face.png', fullPage: true });

  // the drag was one edit
  await page.getByRole('button', { name: 'Undo' }).click();
  await expect(halfX).toHaveValue('10');
  await expect(tooClose).toHaveCount(0, { timeout: 20_000 });
  await expect(page.getByRole('button', { name: 'Undo' })).toBeDisabled();
});

test('a face drag in the select tool is not a selection band: the sites it passes over stay unselected', async ({ page }) => {
  await signUp(page, { email: uniqueEmail('kaia'), name: 'Kaia Sorensen' });
  const projectId = await createProject(page, 'Faces and bands');
  // s2 at (32, −16, 0) a/4 (a diamond site), under the path of the +x face as it is pulled in
  const sites = [
    { id: 's1', species: 'P', position: [0, 0, 0], electrons: 1 },
    { id: 's2', species: 'P', position: [8 * A, -4 * A, 0], electrons: 1 },
  ];
  const design = await designWith(page, projectId, 'Two donors', sites, [6, 6, 6]);
  await openLookingDown(page, projectId, design.id);
  await expect(page.getByRole('radio', { name: /^Select/ })).toHaveAttribute('aria-checked', 'true');
  const grip = await toScreen(page, [6, 0, 0]);
  // the face follows the pointer's x alone in this view; the pointer also wanders to y = −3 nm
  const end = await toScreen(page, [4, -3, 0]);
  await page.mouse.move(grip.x, grip.y);
  await page.mouse.down();
  await page.mouse.move(end.x, end.y, { steps: 8 });
  await page.mouse.up();
  const halfX = page.getByRole('form', { name: 'Domain box and refinement' }).getByLabel('Half-extent x (nm)');
  await expect.poll(async () => Number(await halfX.inputValue())).toBeLessThan(5);
  await expect(page.getByText(/\d+ selected/)).toHaveCount(0);
  await expect(table(page).locator('tr[aria-selected="true"]')).toHaveCount(0);
});
