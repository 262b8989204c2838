/**
 * The many-designs migration on data written under the previous schema, in a throwaway
 * PostgreSQL schema: every existing design keeps its document and version, gets its name from
 * the document, its figures, and a first stored version; nothing is lost.
 */
import { createHash } from 'node:crypto';
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Knex } from 'knex';
import { createKnex } from '../../server/db/config';
import { migrationSource } from '../../server/db/migrate';
import { testDatabaseUrl } from './helpers';
import { demoDesign } from '../../server/db/seed';
import { emptyDesign } from '../../server/services/designs';
import { farFieldCheck } from '../../geometry/farfield';
import type { Design } from '../../geometry/design/types';

const MIGRATION = '20261202000001_many_designs_and_versions.ts';
const schema = `migtest_${randomBytes(4).toString('hex')}`;
let admin: Knex;
let knex: Knex;

/** canonical JSON written independently (sorted keys via a JSON.stringify replacer; ECMA-262 keeps insertion order) */
const canonical = (v: unknown) =>
  JSON.stringify(v, (_k, x: unknown) => (x && typeof x === 'object' && !Array.isArray(x) ? Object.fromEntries(Object.keys(x).sort().map((k) => [k, (x as Record<string, unknown>)[k]])) : x));

beforeAll(async () => {
  admin = createKnex(testDatabaseUrl(), { poolMax: 1 });
  await admin.raw(`CREATE SCHEMA "${schema}"`);
  const u = new URL(testDatabaseUrl());
  u.searchParams.set('options', `-c search_path=${schema}`);
  knex = createKnex(u.toString(), { poolMax: 2 });
});
afterAll(async () => {
  await knex?.destroy();
  await admin?.raw(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
  await admin?.destroy();
});

describe(MIGRATION, () => {
  it('turns each project design into a first design with a stored version, and rolls back', async () => {
    const source = migrationSource();
    const all = await source.getMigrations([]);
    const before = all.slice(0, all.indexOf(MIGRATION));
    expect(before.length).toBeGreaterThan(0);
    for (let i = 0; i < before.length; i++) await knex.migrate.up({ migrationSource: source });

    const [user] = await knex('users').insert({ email: 'm@lab.test', password_hash: 'x', display_name: 'Mig' }).returning('id');
    const [p1] = await knex('projects').insert({ name: 'With sites' }).returning('id');
    const [p2] = await knex('projects').insert({ name: 'Empty' }).returning('id');
    const chain = demoDesign();
    const when = new Date('2026-11-30T10:00:00Z');
    await knex('designs').insert({ project_id: p1.id, document: JSON.stringify(chain), version: 7, updated_by: user.id, updated_at: when });
    await knex('designs').insert({ project_id: p2.id, document: JSON.stringify(emptyDesign('Blank')), version: 1 });

    await knex.migrate.up({ migrationSource: source });
    const rows = await knex('designs').orderBy('id');
    expect(rows.map((r) => [r.name, r.version, r.site_count])).toEqual([
      [chain.name, 7, 4],
      ['Blank', 1, 0],
    ]);
    expect(rows[0].document).toEqual(chain);
    // the stored figure is the far-field check's worstRelBound of the same document (as `npm run cli -- check`)
    expect(rows[0].worst_rel_bound).toBeCloseTo(farFieldCheck(chain as Design).worstRelBound!, 12);
    expect(rows[1].worst_rel_bound).toBeNull();
    const versions = await knex('design_versions').orderBy('design_id');
    expect(versions.map((v) => [v.design_id, v.version, v.created_by])).toEqual([
      [rows[0].id, 7, user.id],
      [rows[1].id, 1, null],
    ]);
    expect(versions[0].document).toEqual(chain);
    expect(new Date(versions[0].created_at).toISOString()).toBe(when.toISOString());
    // FIPS 180-4 SHA-256 (node:crypto) of the canonical JSON computed here
    expect(versions[0].sha256).toBe(createHash('sha256').update(canonical(chain)).digest('hex'));
    // a second design in a project is now allowed
    await knex('designs').insert({ project_id: p1.id, name: 'Second', document: JSON.stringify(emptyDesign('Second')) });

    await knex.migrate.down({ migrationSource: source });
    const back = await knex('designs').orderBy('id');
    expect(back.map((r) => [r.project_id, r.version])).toEqual([
      [p1.id, 7],
      [p2.id, 1],
    ]);
    expect(back[0].document).toEqual(chain);
  });
});
