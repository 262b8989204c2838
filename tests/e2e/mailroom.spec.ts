/**
 * The mail room: site administrators read what the local stand-in SMTP server caught; others
 * do not even see the way in. The admin flag is set directly in the test database, as an
 * operator would, so the test does not rely on a demo seed.
 */
import { expect, test } from '@playwright/test';
import { canSite } from '../../server/contracts/roles';
import { closeTestDb, createProject, signIn, signUp, testDb, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

test('only a site admin sees the mail room, and it lists the invitation e-mail with its link', async ({ page }) => {
  const email = uniqueEmail('admin');
  const invitee = uniqueEmail('guest');
  await signUp(page, { email, name: 'Odile Amsel' });
  // A plain member: no way into the mail room (the role table says members cannot read mail).
  await expect(page.getByRole('link', { name: 'Mail room' })).toHaveCount(canSite('member', 'admin.mail.read') ? 1 : 0);

  await createProject(page, 'Antimony triangle');
  const invite = page.getByRole('form', { name: 'Invite a teammate' });
  await invite.getByLabel('Teammate’s e-mail address').fill(invitee);
  await invite.getByRole('button', { name: 'Send invitation' }).click();
  await expect(page.getByRole('list', { name: 'Open invitations' }).getByText(invitee)).toBeVisible();

  await testDb()('users').whereRaw('lower(email) = ?', [email.toLowerCase()]).update({ site_role: 'admin' });
  // Sign in again so the session carries the new site role.
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page.getByRole('heading', { name: 'Sign in' })).toBeVisible();
  await signIn(page, email);
  await expect(page.getByRole('link', { name: 'Mail room' })).toHaveCount(canSite('admin', 'admin.mail.read') ? 1 : 0);
  await page.getByRole('link', { name: 'Mail room' }).click();

  const messages = page.getByRole('list', { name: 'Captured messages' });
  const entry = messages.getByRole('button').filter({ hasText: invitee }).first();
  await expect(entry).toBeVisible({ timeout: 20_000 });
  await entry.click();
  await expect(entry).toHaveAttribute('aria-expanded', 'true');
  await expect(page.getByRole('link', { name: /\/invite\// }).first()).toBeVisible();
  await page.screenshot({ path: 'tests/artifacts/mail-room.png', fullPage: true });
});
