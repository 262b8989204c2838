/**
 * The sign-up confirmation link in a real browser: before it is followed the account cannot
 * sign in (and the refusal is the generic one, OWASP Authentication cheat sheet on account
 * enumeration); following it signs in; following it a second time shows a plain message,
 * because a confirmation link works once.
 */
import { expect, test } from '@playwright/test';
import { PASSWORD, closeTestDb, mailedLinkFor, submitSignUpForm, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

test('an unconfirmed account cannot sign in; the link signs in once, and a used link says so plainly', async ({ page, browser }) => {
  const email = uniqueEmail('confirm');
  await page.goto('/sign-up');
  await submitSignUpForm(page, { email, name: 'Ines Okafor' });

  // Signing in before confirming: the same generic refusal as a wrong password.
  const early = await browser.newContext();
  const p2 = await early.newPage();
  await p2.goto('/sign-in');
  await p2.getByLabel('E-mail address').fill(email);
  await p2.getByLabel('Password', { exact: true }).fill(PASSWORD);
  await p2.getByRole('button', { name: 'Sign in' }).click();
  const refusal = await p2.getByRole('alert').innerText();
  await p2.getByLabel('Password', { exact: true }).fill('not-the-password-at-all');
  await p2.getByRole('button', { name: 'Sign in' }).click();
  await expect(p2.getByRole('alert')).toHaveText(refusal);
  await expect(p2).toHaveURL(/\/sign-in/);
  await early.close();

  const link = await mailedLinkFor(email, 'verify');
  await page.goto(link);
  await expect(page.getByRole('heading', { level: 1, name: 'Projects', exact: true })).toBeVisible();
  await expect(page.getByText('Ines Okafor')).toBeVisible();

  // The same link again, in another browser: spent.
  const later = await browser.newContext();
  const p3 = await later.newPage();
  await p3.goto(link);
  await expect(p3.getByRole('heading', { level: 1, name: 'This link does not work' })).toBeVisible();
  await expect(p3.getByRole('alert')).toContainText('expired or already used');
  await expect(p3.getByRole('link', { name: 'Sign up again' })).toBeVisible();
  await later.close();
});
