/**
 * Password reset by e-mail: request a link, follow it from the caught message, choose a new
 * password, and sign in with it (the old one no longer works).
 */
import { expect, test } from '@playwright/test';
import { PASSWORD, closeTestDb, mailedLinkFor, signIn, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

test('a forgotten password is replaced through the e-mailed link', async ({ page, browser }) => {
  const email = uniqueEmail('forgetful');
  const setup = await browser.newContext();
  await signUp(await setup.newPage(), { email, name: 'Vera Lindqvist' });
  await setup.close();

  await page.goto('/sign-in');
  await page.getByRole('link', { name: 'Forgot your password?' }).click();
  await page.getByLabel('E-mail address').fill(email);
  await page.getByRole('button', { name: 'Send reset link' }).click();
  // The answer is the same whether or not the address has an account.
  await expect(page.getByRole('status').filter({ hasText: 'If an account uses' })).toContainText(email);

  const link = await mailedLinkFor(email, 'reset');
  await page.goto(link);
  const fresh = 'a-brand-new-passphrase';
  await page.getByLabel('New password', { exact: true }).fill(fresh);
  await page.getByLabel('Repeat the new password').fill(fresh + 'x');
  await page.getByRole('button', { name: 'Set new password' }).click();
  await expect(page.getByText('The two passwords differ.')).toBeVisible();
  await page.getByLabel('Repeat the new password').fill(fresh);
  await page.getByRole('button', { name: 'Set new password' }).click();
  await expect(page.getByRole('heading', { name: 'Password changed' })).toBeVisible();

  // The old password is refused, the new one works.
  await page.goto('/sign-in');
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('alert')).toBeVisible();
  await signIn(page, email, fresh);

  // The link works once.
  const again = await browser.newContext();
  const p2 = await again.newPage();
  await p2.goto(link);
  await p2.getByLabel('New password', { exact: true }).fill('yet-another-passphrase');
  await p2.getByLabel('Repeat the new password').fill('yet-another-passphrase');
  await p2.getByRole('button', { name: 'Set new password' }).click();
  await expect(p2.getByRole('alert')).toContainText('Request a new one');
  await again.close();
});
