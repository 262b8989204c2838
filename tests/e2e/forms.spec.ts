/**
 * Accessible forms: local checks from the shared zod contracts, the server's own refusals in the
 * live region, a visible focus ring, and keyboard-only use.
 */
import { expect, test } from '@playwright/test';
import { PASSWORD, closeTestDb, signUp, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

test('sign-in shows inline errors beside the fields and the server refusal in an alert', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByRole('button', { name: 'Sign in' }).click();
  const email = page.getByLabel('E-mail address');
  await expect(email).toHaveAttribute('aria-invalid', 'true');
  // The error text is tied to the field, so assistive technology reads it with the label.
  const describedBy = await email.getAttribute('aria-describedby');
  expect(describedBy).toBeTruthy();
  await expect(page.locator(`[id="${describedBy}"]`)).toHaveText(/e-mail address/i);
  // After a failed submit the first invalid field takes focus.
  await expect(email).toBeFocused();

  // Well-formed but unknown credentials: the server answers 401 with a generic message.
  await email.fill(uniqueEmail('nobody'));
  await page.getByLabel('Password', { exact: true }).fill('not-the-right-one');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('alert')).toBeVisible();
  await expect(page).toHaveURL(/\/sign-in/);
});

test('sign-up refuses a short password with the contract’s own message', async ({ page }) => {
  await page.goto('/sign-up');
  await page.getByLabel('Display name').fill('Noor Haddad');
  await page.getByLabel('E-mail address').fill(uniqueEmail('short'));
  await page.getByLabel('Password', { exact: true }).fill('tiny');
  await page.getByRole('button', { name: 'Create account' }).click();
  // passwordSchema in server/contracts/api.ts carries this message.
  await expect(page.getByText('Use at least 10 characters.')).toBeVisible();
  await expect(page.getByLabel('Password', { exact: true })).toHaveAttribute('aria-invalid', 'true');
  await expect(page).toHaveURL(/\/sign-up/);
});

test('a second sign-up with the same address is refused without losing the form', async ({ page, browser }) => {
  const email = uniqueEmail('twice');
  await signUp(page, { email, name: 'First Holder' });
  const other = await browser.newContext();
  const p2 = await other.newPage();
  await p2.goto('/sign-up');
  await p2.getByLabel('Display name').fill('Second Holder');
  await p2.getByLabel('E-mail address').fill(email);
  await p2.getByLabel('Password', { exact: true }).fill(PASSWORD);
  await p2.getByRole('button', { name: 'Create account' }).click();
  await expect(p2.getByRole('alert')).toBeVisible();
  await expect(p2).toHaveURL(/\/sign-up/);
  await expect(p2.getByLabel('Display name')).toHaveValue('Second Holder');
  await other.close();
});

test('keyboard alone signs in, and focused controls show a visible ring', async ({ page, browser }) => {
  const email = uniqueEmail('keys');
  const setup = await browser.newContext();
  await signUp(await setup.newPage(), { email, name: 'Ada Keys' });
  await setup.close();

  await page.goto('/sign-in');
  await page.keyboard.press('Tab');
  await expect(page.getByLabel('E-mail address')).toBeFocused();
  const outline = await page.getByLabel('E-mail address').evaluate((el) => getComputedStyle(el).outlineStyle);
  expect(outline).not.toBe('none');
  await page.keyboard.type(email);
  await page.keyboard.press('Tab');
  await expect(page.getByLabel('Password', { exact: true })).toBeFocused();
  await page.keyboard.type(PASSWORD);
  await page.keyboard.press('Enter');
  await expect(page.getByRole('heading', { level: 1, name: 'Projects', exact: true })).toBeVisible();
  await expect(page.getByText('Ada Keys')).toBeVisible();
});
