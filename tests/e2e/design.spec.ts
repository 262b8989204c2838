/**
 * The read-only site table of a project's design. Distances are checked against plain
 * Euclidean geometry on the diamond lattice, with the Si lattice constant from CODATA 2018,
 * never against numbers copied from the screen.
 */
import { expect, test } from '@playwright/test';
import { apiWrite, closeTestDb, createProject, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

// Si lattice constant a = 0.5431020511 nm (CODATA 2018, 22.5 °C).
const A = 0.5431020511;

test('the site table lists each site with its position and nearest-site distance', async ({ page }) => {
  await signUp(page, { email: uniqueEmail('design'), name: 'Pim Laurier' });
  const projectId = await createProject(page, 'Mixed donor trio');

  // An invented trio: two P donors 8a apart along [100] and an As donor a/4·(1,1,1) from the
  // first, i.e. on the neighbouring atom of the diamond basis (bond length a·√3/4).
  const sites = [
    { id: 'P-left', species: 'P', position: [0, 0, 0], electrons: 1 },
    { id: 'P-right', species: 'P', position: [8 * A, 0, 0], electrons: 1 },
    { id: 'As-near', species: 'As', position: [A / 4, A / 4, A / 4], electrons: 0, orbital: { model: 'gaussian', sigmaNm: 1.2 } },
  ];
  const current = (await (await page.request.get(`/api/projects/${projectId}/design`)).json()) as { design: Record<string, unknown>; version: number };
  const put = await apiWrite(page.request, 'PUT', `/api/projects/${projectId}/design`, {
    design: { ...current.design, name: 'Mixed donor trio', sites },
    version: current.version,
  });
  expect(put.status()).toBe(200);
  await page.reload();

  const dist = (p: number[], q: number[]) => Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]);
  const table = page.getByRole('table', { name: /Sites of the design/ });
  await expect(table.getByRole('row')).toHaveCount(1 + sites.length);
  for (const s of sites) {
    const nearest = Math.min(...sites.filter((o) => o !== s).map((o) => dist(s.position, o.position)));
    const row = table.getByRole('row', { name: new RegExp(`^${s.id}\\b`) });
    await expect(row).toContainText(s.position[0].toFixed(3));
    await expect(row).toContainText(nearest.toFixed(3));
  }
  // The diamond bond length a·√3/4 ≈ 0.235 nm is well under two lattice constants: flagged.
  await expect(page.getByRole('note')).toContainText(((A * Math.sqrt(3)) / 4).toFixed(3));
  // Sites without their own orbital say that the species preset applies; the caveat is shown.
  await expect(table.getByRole('row', { name: /^P-left\b/ })).toContainText('species preset');
  await expect(table.getByRole('row', { name: /^As-near\b/ })).toContainText('Gaussian, σ = 1.20 nm');
  await expect(page.getByRole('complementary', { name: 'About these numbers' })).toContainText('model estimates', { ignoreCase: true });
  await page.screenshot({ path: 'tests/artifacts/design-sites.png', fullPage: true });
});
