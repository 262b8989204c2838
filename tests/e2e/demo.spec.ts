/**
 * The demo a first-time visitor meets after `npm start`: sign in with a demo account and find
 * the seeded project with its designs (the four-donor chain, a six-donor chain, a 3 × 3 square). The shared test database is not empty (other
 * tests write to it), so this test seeds a database of its own on the same cluster and runs a
 * second server on it, exactly as the start script does (migrate, seedDemoIfEmpty, start).
 *
 * Distances are checked against geometry: sites at k·a·(1,1,0) are |Δk|·a·√2 apart,
 * a = 0.5431020511 nm (CODATA 2018).
 */
import { expect, test } from '@playwright/test';
import knexFactory from 'knex';
import { randomBytes } from 'node:crypto';
import { migrateLatest } from '../../server/db/migrate';
import { DEMO_ACCOUNTS, DEMO_PROJECT_NAME, demoChainVersions, demoDesign, demoSquareDesign, seedDemoIfEmpty } from '../../server/db/seed';
import { start, type RunningServer } from '../../server/index';

const silent = { info: () => {}, warn: () => {}, error: (...a: unknown[]) => console.error(...a) };

let server: RunningServer | null = null;
let adminUrl = '';
let dbName = '';

test.beforeAll(async () => {
  const base = new URL(process.env.DATABASE_URL!);
  dbName = `tetrawell_e2e_demo_${randomBytes(4).toString('hex')}`;
  const admin = new URL(base);
  admin.pathname = '/postgres';
  adminUrl = admin.toString();
  const adminDb = knexFactory({ client: 'pg', connection: adminUrl, pool: { min: 0, max: 1 } });
  await adminDb.raw('CREATE DATABASE ??', [dbName]);
  await adminDb.destroy();

  const demoUrl = new URL(base);
  demoUrl.pathname = `/${dbName}`;
  await migrateLatest(demoUrl.toString());
  const db = knexFactory({ client: 'pg', connection: demoUrl.toString(), pool: { min: 0, max: 1 } });
  const seeded = await seedDemoIfEmpty(db, { bcryptRounds: 4 });
  await db.destroy();
  expect(seeded.seeded).toBe(true);

  server = await start({ port: 0, databaseUrl: demoUrl.toString(), sessionSecret: randomBytes(16).toString('hex'), logger: silent });
});

test.afterAll(async () => {
  await server?.stop();
  if (dbName) {
    const adminDb = knexFactory({ client: 'pg', connection: adminUrl, pool: { min: 0, max: 1 } });
    await adminDb.raw('DROP DATABASE IF EXISTS ?? WITH (FORCE)', [dbName]);
    await adminDb.destroy();
  }
});

test('each demo account signs in and finds the seeded designs', async ({ browser }) => {
  const design = demoDesign();
  const a = design.host.latticeConstantNm;
  for (const account of DEMO_ACCOUNTS) {
    const context = await browser.newContext({ baseURL: server!.url });
    const page = await context.newPage();
    await page.goto('/sign-in');
    await page.getByLabel('E-mail address').fill(account.email);
    await page.getByLabel('Password', { exact: true }).fill(account.password);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByRole('heading', { level: 1, name: 'Projects', exact: true })).toBeVisible();
    await expect(page.getByRole('banner').getByText(account.displayName)).toBeVisible();
    // Only the site admin gets the way into the mail room.
    await expect(page.getByRole('link', { name: 'Mail room' })).toHaveCount(account.siteRole === 'admin' ? 1 : 0);

    await page.getByRole('link', { name: DEMO_PROJECT_NAME }).click();
    await expect(page.getByRole('heading', { level: 1, name: DEMO_PROJECT_NAME, exact: true })).toBeVisible();
    // The project page lists the seeded designs with their site counts, taken from the seed's own documents.
    const table = page.getByRole('table', { name: /Designs of this project/ });
    const seeded = [design, demoChainVersions().at(-1)!, demoSquareDesign()];
    await expect(table.getByRole('row')).toHaveCount(1 + seeded.length);
    for (const doc of seeded) {
      const row = table.getByRole('row').filter({ has: page.getByRole('link', { name: doc.name, exact: true }) });
      await expect(row.getByRole('cell').nth(1)).toHaveText(String(doc.sites.length));
    }
    // Only those who may edit designs get the controls.
    await expect(page.getByRole('form', { name: 'Start a design' })).toHaveCount(account.projectRole === 'viewer' ? 0 : 1);
    // The chain's spacing is a whole number of [110] steps of a·√2; confirm the formula matches the seed.
    const spacing = Math.hypot(design.sites[1].position[0] - design.sites[0].position[0], design.sites[1].position[1] - design.sites[0].position[1]);
    expect(spacing / (a * Math.SQRT2)).toBeCloseTo(Math.round(spacing / (a * Math.SQRT2)), 9);
    if (account.siteRole === 'admin') await page.screenshot({ path: 'tests/artifacts/demo-project.png', fullPage: true });
    await context.close();
  }
});
