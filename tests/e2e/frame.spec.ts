/**
 * The app frame (issue 8, items 14–16): the not-found page keeps the header and footer for
 * signed-out and signed-in visitors, every page titles its tab, a 120-character unbroken name
 * stays on the page, name fields say when input is too long instead of cutting it, and the
 * activity list writes sentences with names. Screenshots go to tests/artifacts/ to be looked at.
 */
import { expect, test, type Page } from '@playwright/test';
import { apiWrite, closeTestDb, createProject, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

/** Nothing wider than the window: the document does not scroll sideways. */
async function expectNoSidewaysScroll(page: Page) {
  const { scroll, client } = await page.evaluate(() => ({ scroll: document.documentElement.scrollWidth, client: document.documentElement.clientWidth }));
  expect(scroll, 'page width against the window').toBeLessThanOrEqual(client);
}

test('an unknown address keeps the frame for a signed-out visitor', async ({ page }) => {
  await page.goto('/no/such/page');
  await expect(page.getByRole('heading', { level: 1, name: 'Nothing at this address' })).toBeVisible();
  await expect(page.getByRole('banner')).toBeVisible();
  await expect(page.getByRole('contentinfo')).toContainText('Model estimates');
  await expect(page.getByRole('banner').getByRole('link', { name: 'Sign in', exact: true })).toBeVisible();
  await expect(page).toHaveTitle('Page not found · Tetrawell');
  await page.screenshot({ path: 'tests/artifacts/frame-not-found-signed-out.png' });

  await page.goto('/sign-in');
  await expect(page).toHaveTitle('Sign in · Tetrawell');
});

test('titles, a 120-character name, the length counter and the activity sentences', async ({ page }) => {
  test.setTimeout(120_000); // one account and a dozen pages on a shared two-core machine
  await page.setViewportSize({ width: 1280, height: 900 });
  await signUp(page, { email: uniqueEmail('frame'), name: 'Ilse Marchetti' });
  await expect(page).toHaveTitle('Projects · Tetrawell');
  // The project list has a plain heading and no borrowed label above it.
  await expect(page.getByText('Workbench')).toHaveCount(0);

  // Too long: the field keeps every character and says so; nothing is created.
  const form = page.getByRole('form', { name: 'Start a project' });
  const name = form.getByLabel('Project name');
  const tooLong = 'D'.repeat(130);
  await name.fill(tooLong);
  await expect(name).toHaveValue(tooLong);
  await expect(name).toHaveAttribute('aria-invalid', 'true');
  await expect(form.getByText('130 of 120 characters')).toBeVisible();
  await expect(form.getByText(/Too long: 130 characters, at most 120 fit/)).toBeVisible();
  await page.screenshot({ path: 'tests/artifacts/frame-name-too-long.png' });
  await form.getByRole('button', { name: 'Create project' }).click();
  await expect(page).toHaveURL(/\/projects$/);

  // Exactly at the limit and unbroken: created, and it wraps instead of running off the page.
  const longest = `P${'donor'.repeat(22)}Chain${'x'.repeat(4)}`;
  expect(longest).toHaveLength(120);
  const projectId = await createProject(page, longest, 'Invented: a chain of phosphorus donors along [110] under one gate.');
  await expect(page).toHaveTitle(`${longest} · Tetrawell`);
  await expect(page.getByRole('navigation', { name: 'Breadcrumb' }).getByRole('link', { name: 'Projects' })).toBeVisible();
  await expectNoSidewaysScroll(page);
  const h1 = await page.getByRole('heading', { level: 1 }).boundingBox();
  expect(h1!.x + h1!.width).toBeLessThanOrEqual(1280);
  await page.screenshot({ path: 'tests/artifacts/frame-long-name-project.png' });
  await page.goto('/projects');
  await expect(page.getByRole('link', { name: longest })).toBeVisible();
  await expectNoSidewaysScroll(page);
  await page.screenshot({ path: 'tests/artifacts/frame-long-name-list.png' });
  await page.goto(`/projects/${projectId}`);

  // A rename shows in the activity list as a sentence with names, not JSON.
  const current = (await (await page.request.get(`/api/projects/${projectId}`)).json()) as { version: number };
  expect((await apiWrite(page.request, 'PATCH', `/api/projects/${projectId}`, { name: 'Donor chain under one gate', version: current.version })).status()).toBe(200);
  await page.reload();
  const activity = page.getByRole('list', { name: 'Recent activity' });
  await expect(activity).toContainText('Ilse Marchetti renamed the project from “');
  await expect(activity).toContainText('to “Donor chain under one gate”.');
  await expect(activity).not.toContainText('{');
  // The old name was shortened in the sentence; expanding the entry shows it whole.
  await activity.getByText('Show in full').first().click();
  await expect(activity.getByText(longest, { exact: true }).first()).toBeVisible();
  await expect(page.getByText('enclosure', { exact: false })).toHaveCount(0);
  await page.screenshot({ path: 'tests/artifacts/frame-project.png', fullPage: true });

  // Back on the list, the long name (now renamed) and others stay inside the window.
  await page.goto('/projects');
  await expectNoSidewaysScroll(page);
  await page.screenshot({ path: 'tests/artifacts/frame-projects.png', fullPage: true });

  await page.getByRole('link', { name: 'Account' }).click();
  await expect(page).toHaveTitle('Your account · Tetrawell');

  // Signed in, an unknown address still shows the header with the person's name and the footer.
  await page.goto('/projects/12/nowhere');
  await expect(page.getByRole('heading', { level: 1, name: 'Nothing at this address' })).toBeVisible();
  await expect(page.getByRole('banner').getByText('Ilse Marchetti')).toBeVisible();
  await expect(page.getByRole('contentinfo')).toBeVisible();
  await expect(page.getByRole('link', { name: 'Go to your projects' })).toBeVisible();
  await expect(page).toHaveTitle('Page not found · Tetrawell');
  await page.screenshot({ path: 'tests/artifacts/frame-not-found-signed-in.png' });
});
