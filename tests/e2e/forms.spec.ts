/**
 * Accessible forms: local checks from the shared zod contracts, the server's own refusals in the
 * live region, a visible focus ring, and keyboard-only use.
 */
import { expect, test } from '@playwright/test';
import { PASSWORD, closeTestDb, mailedLinkFor, signUp, submitSignUpForm, testDb, uniqueEmail } from './helpers';

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

test('a second sign-up with the same address looks exactly like a first one; the owner is told by e-mail', async ({ page, browser }) => {
  const email = uniqueEmail('twice');
  await signUp(page, { email, name: 'First Holder' });
  const fresh = uniqueEmail('fresh');

  // The same form sent for a known and for a new address: the page must not tell them apart.
  const seen: string[] = [];
  for (const address of [email, fresh]) {
    const other = await browser.newContext();
    const p2 = await other.newPage();
    await p2.goto('/sign-up');
    await submitSignUpForm(p2, { email: address, name: 'Second Holder' });
    await expect(p2.getByRole('main').getByRole('status')).toContainText(address);
    // signed in nowhere: the projects page sends back to sign-in
    seen.push((await p2.getByRole('main').innerText()).replace(address, '<address>'));
    await p2.goto('/projects');
    await expect(p2).toHaveURL(/\/sign-in/);
    await other.close();
  }
  expect(seen[1]).toBe(seen[0]);

  // Only the mail differs: the owner of the known address gets a note with the sign-in and reset links.
  await expect
    .poll(
      async () => {
        const rows: { subject: string; text: string; recipients: unknown }[] = await testDb()('captured_mail').select('subject', 'text', 'recipients').orderBy('id', 'desc').limit(200);
        const note = rows.find((r) => JSON.stringify(r.recipients).toLowerCase().includes(email.toLowerCase()) && /Someone tried/.test(r.subject));
        return note ? /\/sign-in\b/.test(note.text) && /\/reset\b/.test(note.text) : null;
      },
      { message: `sign-up attempt note to ${email}`, timeout: 15_000 },
    )
    .toBe(true);
  // and the new address got a confirmation link
  expect(await mailedLinkFor(fresh, 'verify')).toMatch(/\/verify\//);
  const names = await testDb()('users').whereRaw('lower(email) = ?', [email.toLowerCase()]).pluck('display_name');
  expect(names).toEqual(['First Holder']);
});

test('keyboard alone signs in, and focused controls show a visible ring', async ({ page, browser }) => {
  const email = uniqueEmail('keys');
  const setup = await browser.newContext();
  await signUp(await setup.newPage(), { email, name: 'Ada Keys' });
  await setup.close();

  await page.goto('/sign-in');
  // The first stop is the skip link (WCAG 2.4.1 Bypass Blocks); following it lands before the form.
  await page.keyboard.press('Tab');
  await expect(page.getByRole('link', { name: 'Skip to content' })).toBeFocused();
  await page.keyboard.press('Enter');
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
