/**
 * Shared steps for the browser tests. Every test makes its own users and projects (unique
 * addresses), so tests never depend on each other or on a demo seed.
 */
import { expect, type APIRequestContext, type Page } from '@playwright/test';
import knexFactory, { type Knex } from 'knex';
import { randomBytes } from 'node:crypto';

export const PASSWORD = 'correct-horse-battery-9';

export function uniqueEmail(who: string): string {
  return `${who}.${Date.now().toString(36)}${randomBytes(3).toString('hex')}@lab.example`;
}

let db: Knex | null = null;
/** The test database the server under test uses (playwright.config.ts requires DATABASE_URL). */
export function testDb(): Knex {
  db ??= knexFactory({ client: 'pg', connection: process.env.DATABASE_URL, pool: { min: 0, max: 2 } });
  return db;
}

export async function closeTestDb(): Promise<void> {
  if (db) await db.destroy();
  db = null;
}

/** Fill and send the sign-up form on the current page, and wait for the "check your e-mail" answer. */
export async function submitSignUpForm(page: Page, opts: { email?: string; name: string; password?: string }): Promise<void> {
  await page.getByLabel('Display name').fill(opts.name);
  if (opts.email !== undefined) await page.getByLabel('E-mail address').fill(opts.email);
  await page.getByLabel('Password', { exact: true }).fill(opts.password ?? PASSWORD);
  await page.getByRole('button', { name: 'Create account' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Check your e-mail' })).toBeVisible();
}

/** Follow the newest confirmation link e-mailed to `email` in this page (signs in). */
export async function confirmEmail(page: Page, email: string): Promise<void> {
  await page.goto(await mailedLinkFor(email, 'verify'));
}

/**
 * Sign up through the real form, follow the confirmation link from the e-mail (read from the
 * fake SMTP server's captured_mail) and wait until the project list shows.
 */
export async function signUp(page: Page, opts: { email: string; name: string; password?: string }): Promise<void> {
  await page.goto('/sign-up');
  await submitSignUpForm(page, opts);
  await confirmEmail(page, opts.email);
  await expect(page.getByRole('heading', { level: 1, name: 'Projects', exact: true })).toBeVisible();
}

export async function signIn(page: Page, email: string, password = PASSWORD): Promise<void> {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail address').fill(email);
  await page.getByLabel('Password', { exact: true }).fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Projects', exact: true })).toBeVisible();
}

/** Create a project through the form; resolves to its id, read from the URL it opens. */
export async function createProject(page: Page, name: string, description = ''): Promise<number> {
  await page.goto('/projects');
  const form = page.getByRole('form', { name: 'Start a project' });
  await form.getByLabel('Project name').fill(name);
  if (description) await form.getByLabel('Description').fill(description);
  await form.getByRole('button', { name: 'Create project' }).click();
  await expect(page.getByRole('heading', { level: 1, name, exact: true })).toBeVisible();
  const m = /\/projects\/(\d+)$/.exec(new URL(page.url()).pathname);
  expect(m, 'project page URL').not.toBeNull();
  return Number(m![1]);
}

/** The newest `/<kind>/<token>` link e-mailed to `to`, as caught by the fake SMTP server. */
export async function mailedLinkFor(to: string, kind: 'invite' | 'reset' | 'verify'): Promise<string> {
  const pattern = new RegExp(`https?://\\S+/${kind}/[A-Za-z0-9_-]+`);
  let link: string | null = null;
  await expect
    .poll(
      async () => {
        const rows: { text: string; recipients: unknown }[] = await testDb()('captured_mail').select('text', 'recipients').orderBy('id', 'desc').limit(200);
        const row = rows.find((r) => JSON.stringify(r.recipients).toLowerCase().includes(to.toLowerCase()) && pattern.test(r.text));
        link = row ? (pattern.exec(row.text)?.[0] ?? null) : null;
        return link;
      },
      { message: `${kind} e-mail to ${to}`, timeout: 15_000 },
    )
    .not.toBeNull();
  return link!;
}

export const invitationLinkFor = (to: string) => mailedLinkFor(to, 'invite');

/** A request context call with the page's session and a fresh CSRF token (for setting up races). */
export async function apiWrite(request: APIRequestContext, method: 'PATCH' | 'PUT' | 'POST', url: string, data: unknown) {
  const { csrfToken } = (await (await request.get('/api/auth/csrf')).json()) as { csrfToken: string };
  return request.fetch(url, { method, data, headers: { 'x-csrf-token': csrfToken } });
}
