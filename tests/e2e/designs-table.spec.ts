/**
 * The project page's designs table: start, sort, filter, duplicate, rename and delete (with a
 * confirmation) for an owner; the table alone for a viewer. The worst bound is checked against
 * its definition in the contract (a relative bound, shown ×100 as a percentage) and the site
 * count against the document that was saved, never against figures copied from the screen.
 */
import { expect, test } from '@playwright/test';
import { apiWrite, closeTestDb, createProject, signUp, testDb, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

// Si lattice constant a = 0.5431020511 nm (CODATA 2018).
const A = 0.5431020511;

test('an owner starts, sorts, filters, duplicates, renames and deletes designs; a viewer only reads', async ({ page, browser }) => {
  test.setTimeout(150_000); // two accounts and a dozen writes on a shared two-core machine
  await page.setViewportSize({ width: 1280, height: 900 });
  const ownerEmail = uniqueEmail('designs');
  await signUp(page, { email: ownerEmail, name: 'Kofi Brandt' });
  const projectId = await createProject(page, 'Donor chains at 4 nm');
  const table = page.getByRole('table', { name: /Designs of this project/ });
  // A new project starts with one empty design.
  await expect(table.getByRole('row')).toHaveCount(2);

  // Start a design through the form.
  const start = page.getByRole('form', { name: 'Start a design' });
  await start.getByLabel('New design name').fill('Six-site chain');
  await start.getByRole('button', { name: 'Start design' }).click();
  await expect(table.getByRole('link', { name: 'Six-site chain' })).toBeVisible();
  await expect(page).toHaveTitle('Donor chains at 4 nm · Tetrawell');

  // Give it six P donors 8a apart along [100] (an invented chain), saved through the API.
  const list = (await (await page.request.get(`/api/projects/${projectId}/designs`)).json()) as { designs: { id: number; name: string }[] };
  const chain = list.designs.find((d) => d.name === 'Six-site chain')!;
  const detail = (await (await page.request.get(`/api/projects/${projectId}/designs/${chain.id}`)).json()) as { design: { document: Record<string, unknown>; version: number } };
  const sites = Array.from({ length: 6 }, (_, i) => ({ id: `P${i + 1}`, species: 'P', position: [(i - 2.5) * 8 * A, 0, 0], electrons: 1 }));
  const put = await apiWrite(page.request, 'PUT', `/api/projects/${projectId}/designs/${chain.id}`, { document: { ...detail.design.document, sites }, version: detail.design.version });
  expect(put.status()).toBe(200);
  await page.reload();

  const after = (await (await page.request.get(`/api/projects/${projectId}/designs`)).json()) as { designs: { id: number; siteCount: number; worstRelBound: number | null }[] };
  const saved = after.designs.find((d) => d.id === chain.id)!;
  expect(saved.siteCount).toBe(sites.length);
  const chainRow = table.getByRole('row').filter({ has: page.getByRole('link', { name: 'Six-site chain', exact: true }) });
  await expect(chainRow).toContainText('6');
  if (saved.worstRelBound !== null) {
    // Two significant figures of the percentage: the contract's relative bound × 100.
    const pct = saved.worstRelBound * 100;
    if (pct >= 1e-4 && pct < 10) await expect(chainRow).toContainText(`${Number(pct.toPrecision(2))} %`);
  }
  await expect(table.getByRole('link', { name: 'Six-site chain' })).toHaveAttribute('href', `/projects/${projectId}/designs/${chain.id}`);

  // Sort by sites: ascending puts the empty design first, descending the chain.
  const firstName = async () => (await table.getByRole('row').nth(1).getByRole('link').first().textContent())?.trim();
  await table.getByRole('button', { name: /Sites/ }).click();
  await expect(table.getByRole('columnheader', { name: /Sites/ })).toHaveAttribute('aria-sort', 'ascending');
  expect(await firstName()).toBe('Donor chains at 4 nm');
  await table.getByRole('button', { name: /Sites/ }).click();
  await expect(table.getByRole('columnheader', { name: /Sites/ })).toHaveAttribute('aria-sort', 'descending');
  expect(await firstName()).toBe('Six-site chain');

  // Duplicate, then filter down to the chain and its copy.
  await table.getByRole('button', { name: 'Duplicate Six-site chain' }).click();
  await expect(table.getByRole('link', { name: 'Six-site chain (copy)' })).toBeVisible();
  await page.getByLabel('Filter by name or person').fill('CHAIN (');
  await expect(table.getByRole('row')).toHaveCount(2);
  await page.getByLabel('Filter by name or person').fill('six');
  await expect(table.getByRole('row')).toHaveCount(3);
  await page.getByLabel('Filter by name or person').fill('');

  // Rename the copy; a name over the limit is refused in place, not cut.
  await table.getByRole('button', { name: 'Rename Six-site chain (copy)' }).click();
  const rename = page.getByRole('form', { name: 'Rename Six-site chain (copy)' });
  await rename.getByLabel('Design name').fill('x'.repeat(205));
  await expect(rename.getByText('205 of 200 characters')).toBeVisible();
  await rename.getByLabel('Design name').fill('Six-site chain, disorder seed 7');
  await rename.getByRole('button', { name: 'Save name' }).click();
  await expect(table.getByRole('link', { name: 'Six-site chain, disorder seed 7' })).toBeVisible();
  await page.screenshot({ path: 'tests/artifacts/designs-table.png', fullPage: true });

  // Delete asks first; "Keep" leaves it, "Delete" removes it.
  await table.getByRole('button', { name: 'Delete Six-site chain, disorder seed 7' }).click();
  const confirm = page.getByRole('group', { name: 'Confirm deleting Six-site chain, disorder seed 7' });
  await expect(confirm).toContainText('Delete for everyone?');
  await page.screenshot({ path: 'tests/artifacts/designs-delete-confirm.png', fullPage: true });
  await confirm.getByRole('button', { name: 'Keep' }).click();
  await expect(table.getByRole('link', { name: 'Six-site chain, disorder seed 7' })).toBeVisible();
  await table.getByRole('button', { name: 'Delete Six-site chain, disorder seed 7' }).click();
  await page.getByRole('group', { name: /Confirm deleting/ }).getByRole('button', { name: 'Delete', exact: true }).click();
  await expect(table.getByRole('link', { name: 'Six-site chain, disorder seed 7' })).toHaveCount(0);
  await expect(table.getByRole('row')).toHaveCount(3);

  // The activity list tells the story in sentences.
  const activity = page.getByRole('list', { name: 'Recent activity' });
  await expect(activity).toContainText('Kofi Brandt deleted the design “Six-site chain, disorder seed 7”.');
  await expect(activity).toContainText('Kofi Brandt renamed the design “Six-site chain (copy)” to “Six-site chain, disorder seed 7”.');

  // A viewer sees the table and none of the edit controls.
  const viewerEmail = uniqueEmail('designs-viewer');
  const context = await browser.newContext();
  const viewer = await context.newPage();
  await signUp(viewer, { email: viewerEmail, name: 'Lena Viewer' });
  const viewerId = (await testDb()('users').where({ email: viewerEmail }).first('id')).id as number;
  await testDb()('memberships').insert({ project_id: projectId, user_id: viewerId, role: 'viewer' });
  await viewer.goto(`/projects/${projectId}`);
  const vTable = viewer.getByRole('table', { name: /Designs of this project/ });
  await expect(vTable.getByRole('link', { name: 'Six-site chain', exact: true })).toBeVisible();
  await expect(viewer.getByRole('form', { name: 'Start a design' })).toHaveCount(0);
  await expect(vTable.getByRole('button', { name: /^(Duplicate|Rename|Delete) / })).toHaveCount(0);
  await viewer.screenshot({ path: 'tests/artifacts/designs-table-viewer.png', fullPage: true });
  await context.close();
});
