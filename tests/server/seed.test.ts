/**
 * Migrations and the demo seed, in a throwaway PostgreSQL schema of their own (so the seed
 * sees an empty database even while other test files fill the shared one).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomBytes } from 'node:crypto';
import { readdirSync } from 'node:fs';
import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { designSchema } from '@contracts/design';
import { createKnex, MIGRATIONS_DIR } from '../../server/db/config';
import { migrateLatestWith, migrationSource } from '../../server/db/migrate';
import { DEMO_ACCOUNTS, DEMO_PASSWORD, seedDemoIfEmpty } from '../../server/db/seed';
import { start, type RunningServer } from '../../server/index';
import { silentLogger } from '../../server/config';
import { testDatabaseUrl, TestClient } from './helpers';

/** Si lattice constant a in nm, CODATA 2018 (22.5 °C). */
const A_SI = 0.5431020511;

const schema = `seedtest_${randomBytes(4).toString('hex')}`;
let admin: Knex;
let knex: Knex;
let urlInSchema: string;

beforeAll(async () => {
  admin = createKnex(testDatabaseUrl(), { poolMax: 1 });
  await admin.raw(`CREATE SCHEMA "${schema}"`);
  // libpq "options" parameter: every connection of this URL works inside the throwaway schema
  const u = new URL(testDatabaseUrl());
  u.searchParams.set('options', `-c search_path=${schema}`);
  urlInSchema = u.toString();
  knex = createKnex(urlInSchema, { poolMax: 3 });
});
afterAll(async () => {
  await knex?.destroy();
  await admin?.raw(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
  await admin?.destroy();
});

describe('migrations', () => {
  it('apply every file in migrations/, roll all the way back, and apply again', async () => {
    const files = readdirSync(MIGRATIONS_DIR).filter((f) => f.endsWith('.ts')).sort();
    expect(await migrateLatestWith(knex)).toEqual(files);
    expect(await migrateLatestWith(knex)).toEqual([]);
    const tables = (await knex.raw(`select table_name from information_schema.tables where table_schema = ? order by 1`, [schema])).rows.map((r: { table_name: string }) => r.table_name);
    for (const t of ['users', 'sessions', 'projects', 'memberships', 'invitations', 'password_resets', 'designs', 'design_versions', 'audit_events', 'captured_mail']) expect(tables).toContain(t);

    await knex.migrate.rollback({ migrationSource: migrationSource() }, true);
    const after = (await knex.raw(`select count(*)::int as n from information_schema.tables where table_schema = ? and table_name = 'users'`, [schema])).rows[0].n;
    expect(after).toBe(0);
    expect(await migrateLatestWith(knex)).toEqual(files);
  });
});

describe('demo seed', () => {
  it('seeds an empty database once, and never again', async () => {
    const first = await seedDemoIfEmpty(knex, { bcryptRounds: 4 });
    expect(first.seeded).toBe(true);
    expect(first.accounts.map((a) => a.email)).toEqual(DEMO_ACCOUNTS.map((a) => a.email));
    const second = await seedDemoIfEmpty(knex, { bcryptRounds: 4 });
    expect(second.seeded).toBe(false);
    expect(await knex('users').count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '2' }]);
    expect(await knex('projects').count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '1' }]);
  });

  it('has a site admin who owns the project and a second user with another role', async () => {
    const rows = await knex('users as u').join('memberships as m', 'm.user_id', 'u.id').select('u.email', 'u.site_role', 'm.role', 'u.password_hash').orderBy('u.id');
    expect(rows.map((r) => [r.site_role, r.role])).toEqual([
      ['admin', 'owner'],
      ['member', 'editor'],
    ]);
    for (const r of rows) expect(await bcrypt.compare(DEMO_PASSWORD, r.password_hash)).toBe(true);
  });

  it('stores a valid four-donor chain along [110], sites on diamond lattice points ~4.6 nm apart', async () => {
    const doc = designSchema.parse((await knex('designs').orderBy('id').first()).document);
    expect(doc.sites).toHaveLength(4);
    expect(doc.host.latticeConstantNm).toBe(A_SI);
    const q = A_SI / 4;
    for (const s of doc.sites) {
      expect(s.species).toBe('P');
      const n = s.position.map((x) => x / q);
      for (const v of n) expect(Math.abs(v - Math.round(v))).toBeLessThan(1e-9);
      // diamond structure in units of a/4: fcc points have all-even coordinates with sum ≡ 0 (mod 4);
      // the second basis atom adds (1,1,1), giving all-odd coordinates with sum ≡ 3 (mod 4)
      // (Kittel, Introduction to Solid State Physics, ch. 1; from memory)
      const r = n.map(Math.round);
      const sum = r[0] + r[1] + r[2];
      const allEven = r.every((v) => v % 2 === 0);
      const allOdd = r.every((v) => Math.abs(v % 2) === 1);
      expect((allEven && ((sum % 4) + 4) % 4 === 0) || (allOdd && ((sum % 4) + 4) % 4 === 3)).toBe(true);
    }
    for (let i = 1; i < doc.sites.length; i++) {
      const [a, b] = [doc.sites[i - 1].position, doc.sites[i].position];
      const d = [b[0] - a[0], b[1] - a[1], b[2] - a[2]];
      const len = Math.hypot(d[0], d[1], d[2]);
      // along [110]: equal x and y steps, no z step
      expect(d[0]).toBeCloseTo(d[1], 12);
      expect(d[2]).toBe(0);
      expect(len).toBeCloseTo(6 * A_SI * Math.SQRT2, 9);
      expect(Math.abs(len - 4.6)).toBeLessThan(0.1);
    }
  });

  it('holds three designs: the four-donor chain, a six-donor chain in two versions and a 3 × 3 square at 8a', async () => {
    const designs = await knex('designs').orderBy('id');
    expect(designs.map((d) => [d.site_count, d.version])).toEqual([
      [4, 1],
      [6, 2],
      [9, 1],
    ]);
    for (const d of designs) {
      const doc = designSchema.parse(d.document);
      expect(d.name).toBe(doc.name);
      // every seeded design is inside its box, so the far-field check gives a finite bound
      expect(d.worst_rel_bound).toBeGreaterThan(0);
      expect(d.worst_rel_bound).toBeLessThan(1);
    }
    const chain = designSchema.parse(designs[1].document);
    const gaps = chain.sites.slice(1).map((s, i) => Math.hypot(...s.position.map((x, k) => x - chain.sites[i].position[k])));
    // snapping moves each site by at most the covering radius of the lattice, ≤ a/2 (that of its FCC
    // sublattice alone: the octahedral hole; from memory), so each step is within a of 4 nm
    for (const g of gaps) expect(Math.abs(g - 4)).toBeLessThan(A_SI);
    const square = designSchema.parse(designs[2].document);
    const xs = [...new Set(square.sites.map((s) => s.position[0].toFixed(9)))].map(Number).sort((a, b) => a - b);
    expect(xs).toHaveLength(3);
    expect(xs[1] - xs[0]).toBeCloseTo(8 * A_SI, 9);
    const versions = await knex('design_versions').where({ design_id: designs[1].id }).orderBy('version');
    expect(versions.map((v) => v.version)).toEqual([1, 2]);
    expect(versions[0].document.domain.halfExtentsNm).toEqual([15, 15, 15]);
    expect(versions[1].document.domain.halfExtentsNm).toEqual([30, 30, 30]);
  });

  it('lets the printed demo account sign in to the real server', async () => {
    let server: RunningServer | null = null;
    try {
      server = await start({ port: 0, databaseUrl: urlInSchema, staticDir: null, logger: silentLogger, sessionSecret: 'y'.repeat(32) });
      const c = new TestClient(server.url);
      const me = await c.signIn(DEMO_ACCOUNTS[0].email, DEMO_PASSWORD);
      expect(me.siteRole).toBe('admin');
      const projects = (await c.get('/api/projects')).body.projects;
      expect(projects).toHaveLength(1);
      expect(projects[0].role).toBe('owner');
      const designs = (await c.get(`/api/projects/${projects[0].id}/designs`)).body.designs;
      expect(designs.map((d: { siteCount: number }) => d.siteCount)).toEqual([4, 6, 9]);
      expect((await c.get(`/api/projects/${projects[0].id}/designs/${designs[0].id}`)).body.design.document.sites).toHaveLength(4);
    } finally {
      await server?.stop();
    }
  });
});
