/**
 * The canvas by hand: a donor placed by clicking the canvas lands on a silicon lattice site of the
 * active (001) layer, and the site table's orbital editor sets and undoes an override.
 * Lattice check: diamond-lattice positions in a/4 units are integers (Kittel ch. 1, from memory);
 * the table flags anything further than its tolerance as "off lattice".
 */
import { expect, test } from '@playwright/test';
import { apiWrite, closeTestDb, createProject, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);
test.describe.configure({ timeout: 150_000 });

test('a donor placed by clicking the canvas sits on the lattice; its orbital override is edited in the table and undone', async ({ page }) => {
  await signUp(page, { email: uniqueEmail('hedda'), name: 'Hedda Lindqvist' });
  const projectId = await createProject(page, 'Hand placement');
  const res = await apiWrite(page.request, 'POST', `/api/projects/${projectId}/designs`, { name: 'One by one' });
  expect(res.status()).toBe(201);
  const designId = ((await res.json()) as { design: { id: number } }).design.id;
  await page.goto(`/projects/${projectId}/designs/${designId}`);
  const canvas = page.getByRole('region', { name: 'Design canvas' });
  await expect(page.locator('canvas')).toBeVisible({ timeout: 30_000 });

  await page.getByRole('button', { name: 'Along [001]' }).click();
  await page.getByRole('radio', { name: /Place donor/ }).click();
  const box = (await canvas.boundingBox())!;
  await page.mouse.move(box.x + box.width * 0.55, box.y + box.height * 0.55);
  await page.mouse.click(box.x + box.width * 0.55, box.y + box.height * 0.55);

  const table = page.getByRole('table', { name: 'Sites' });
  await expect(table.getByRole('row')).toHaveCount(2, { timeout: 20_000 });
  const row = table.getByRole('row').nth(1);
  await expect(row).not.toContainText('off lattice');
  const cells = row.getByRole('cell');
  // z is the active layer's plane, 0 nm for layer 0
  await expect(cells.nth(5)).toHaveText('0.000');
  const lattice = (await cells.nth(6).innerText()).split(',').map((t) => Number(t.trim()));
  expect(lattice.every(Number.isInteger)).toBe(true);
  await page.screenshot({ path: 'tests/artifacts/studio-canvas-place.png', fullPage: true });

  const siteId = (await cells.nth(0).innerText()).trim();
  await page.getByRole('button', { name: `Edit orbital of site ${siteId}` }).click();
  const editor = page.getByRole('group', { name: `Orbital of site ${siteId}` });
  // the editor shows whole, however short the table it opens from (one row here): nothing of it is
  // clipped by the table's scroll box or the window, and its last button is the element on top there
  const wholeAndOnTop = async () => {
    await expect(editor).toBeInViewport({ ratio: 1 });
    const apply = (await editor.getByRole('button', { name: 'Apply' }).boundingBox())!;
    const onTop = await page.evaluate(([x, y]) => document.elementFromPoint(x, y)?.textContent ?? null, [apply.x + apply.width / 2, apply.y + apply.height / 2]);
    expect(onTop).toBe('Apply');
  };
  await editor.getByLabel('Orbital model').selectOption('anisotropic-1s');
  await wholeAndOnTop();
  await editor.getByLabel('Orbital model').selectOption('gaussian');
  await editor.getByLabel(/Sigma/).fill('-1');
  await editor.getByRole('button', { name: 'Apply' }).click();
  await expect(editor.getByRole('alert')).toContainText('Sigma (nm)');
  await wholeAndOnTop();
  await editor.getByLabel(/Sigma/).fill('1.2');
  await page.screenshot({ path: 'tests/artifacts/studio-orbital-editor.png', fullPage: true });
  await editor.getByRole('button', { name: 'Apply' }).click();
  await expect(row).toContainText('own override');
  await page.getByRole('button', { name: 'Undo' }).click();
  await expect(row).toContainText('species preset');
});
