/**
 * Optimistic concurrency as a person meets it: a display name changed elsewhere after this
 * page opened must not be overwritten silently (HTTP 409 Conflict, RFC 9110 §15.5.10).
 */
import { expect, test } from '@playwright/test';
import { apiWrite, closeTestDb, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

test('a stale display-name save is refused, explained, and the latest can be loaded', async ({ page }) => {
  await signUp(page, { email: uniqueEmail('acct'), name: 'Rhea Castell' });
  await page.getByRole('link', { name: 'Account' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Your account' })).toBeVisible();
  const field = page.getByRole('textbox', { name: 'Display name' });
  await expect(field).toHaveValue('Rhea Castell');

  // Meanwhile, "another tab" renames the account using the version this page also holds.
  const me = (await (await page.request.get('/api/auth/me')).json()) as { user: { version: number } };
  const other = await apiWrite(page.request, 'PATCH', '/api/account', { displayName: 'Rhea C. (other tab)', version: me.user.version });
  expect(other.status()).toBe(200);

  await field.fill('Rhea Castell-Moreau');
  await page.getByRole('button', { name: 'Save name' }).click();
  await expect(page.getByRole('alert')).toContainText('Someone else changed your account details');
  // Nothing was overwritten: the server still has the other tab's name.
  const after = (await (await page.request.get('/api/auth/me')).json()) as { user: { displayName: string } };
  expect(after.user.displayName).toBe('Rhea C. (other tab)');

  await page.getByRole('button', { name: 'Load the latest' }).click();
  await expect(field).toHaveValue('Rhea C. (other tab)');

  // Saving again from the fresh copy works.
  await field.fill('Rhea Castell-Moreau');
  await page.getByRole('button', { name: 'Save name' }).click();
  await expect(page.getByRole('status').filter({ hasText: 'Name saved.' })).toBeVisible();
  await expect(page.getByRole('banner').getByText('Rhea Castell-Moreau')).toBeVisible();
});
