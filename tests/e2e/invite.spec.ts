/**
 * The team story in a real browser: sign up, create a project, invite a teammate by e-mail,
 * follow the e-mailed link as the teammate, join, and see what a viewer may and may not do.
 * The expected visibility comes from the role table (server/contracts/roles.ts), not from
 * numbers written into this test.
 */
import { expect, test } from '@playwright/test';
import { can } from '../../server/contracts/roles';
import { closeTestDb, confirmEmail, createProject, invitationLinkFor, signUp, submitSignUpForm, uniqueEmail } from './helpers';

test.afterAll(closeTestDb);

test('a new user signs up, creates a project and invites a teammate by e-mail', async ({ page, browser }) => {
  const ownerEmail = uniqueEmail('owner');
  const mateEmail = uniqueEmail('mate');
  await signUp(page, { email: ownerEmail, name: 'Ilse Varga' });
  await createProject(page, 'Boron pair under a gate', 'Two B acceptors 3 nm apart; how much does V shift?');

  // Owners see the invitation form.
  const invite = page.getByRole('form', { name: 'Invite a teammate' });
  await invite.getByLabel('Teammate’s e-mail address').fill(mateEmail);
  await invite.getByLabel('Role in this project').selectOption('viewer');
  await invite.getByRole('button', { name: 'Send invitation' }).click();

  const open = page.getByRole('list', { name: 'Open invitations' });
  await expect(open.getByText(mateEmail)).toBeVisible();
  await expect(invite.getByRole('status')).toContainText(`Invitation e-mailed to ${mateEmail}`);
  await page.screenshot({ path: 'tests/artifacts/invite.png', fullPage: true });

  // The teammate follows the link from the e-mail in a browser of their own.
  const link = await invitationLinkFor(mateEmail);
  const mateContext = await browser.newContext();
  const mate = await mateContext.newPage();
  await mate.goto(link);
  await expect(mate.getByRole('heading', { name: 'Join “Boron pair under a gate”' })).toBeVisible();
  await mate.getByRole('link', { name: 'Create an account' }).click();
  // The invitation's address is carried over to the sign-up form.
  await expect(mate.getByLabel('E-mail address')).toHaveValue(mateEmail);
  await submitSignUpForm(mate, { name: 'Kofi Brandt', password: 'another-long-passphrase' });
  // The confirmation link from the e-mail signs in and leads back to the invitation page.
  await confirmEmail(mate, mateEmail);

  // Back on the invitation page, now signed in with the invited address.
  await mate.getByRole('button', { name: 'Accept and open the project' }).click();
  await expect(mate.getByRole('heading', { level: 1, name: 'Boron pair under a gate', exact: true })).toBeVisible();

  // A viewer's page hides what the role table does not allow.
  const viewerMayInvite = can('viewer', 'members.invite');
  const viewerMayChangeRoles = can('viewer', 'members.changeRole');
  await expect(mate.getByRole('form', { name: 'Invite a teammate' })).toHaveCount(viewerMayInvite ? 1 : 0);
  await expect(mate.getByRole('combobox', { name: /Role of/ })).toHaveCount(viewerMayChangeRoles ? 2 : 0);
  await expect(mate.getByRole('form', { name: 'Delete project' })).toHaveCount(0);
  await expect(mate.getByRole('button', { name: 'Delete project…' })).toHaveCount(can('viewer', 'project.delete') ? 1 : 0);
  await mate.screenshot({ path: 'tests/artifacts/invite-accepted-viewer.png', fullPage: true });

  // The owner sees the new member, and the invitation is no longer open.
  await page.reload();
  const team = page.getByRole('list', { name: 'Team members' });
  await expect(team.getByText(mateEmail)).toBeVisible();
  await expect(page.getByRole('list', { name: 'Open invitations' })).toHaveCount(0);
  await mateContext.close();
});
