/**
 * Demo data for a fresh installation, in an invented scenario: the "Atomic Dopant Architecture
 * Lab" of the fictional Fenwick Moor University. Two people, one project with three designs (a
 * four-donor chain, a six-donor chain saved in two versions, a 3 × 3 square array), so a first
 * sign-in shows something to look at.
 *
 * Seeds only an empty database (no users at all); never touches an installation in use.
 * The demo password is deliberately public (printed by `npm start`): change it or remove the
 * demo accounts before anyone else can reach the server.
 */
import bcrypt from 'bcryptjs';
import type { Knex } from 'knex';
import { designSchema, type DesignDocument } from '@contracts/design';
import type { ProjectRole, SiteRole } from '@contracts/roles';
import { usersRepo } from '../repositories/users';
import { projectsRepo } from '../repositories/projects';
import { membershipsRepo } from '../repositories/memberships';
import { designsRepo } from '../repositories/designs';
import { auditRepo } from '../repositories/audit';
import { designWriteSync } from '../services/designs';
import { generateArray } from '../../geometry/arrays';
import { SI_EPSILON_R, SI_LATTICE_CONSTANT_NM } from '../../geometry/units';

export interface DemoAccount {
  email: string;
  password: string;
  displayName: string;
  siteRole: SiteRole;
  projectRole: ProjectRole;
}

export interface DemoSeedResult {
  /** true when this call wrote the demo; false when the database already had users */
  seeded: boolean;
  /** the demo sign-ins, when the demo accounts exist (their passwords may have been changed since) */
  accounts: DemoAccount[];
  projectName: string;
}

export const DEMO_PASSWORD = 'fenwick-moor-demo';
export const DEMO_PROJECT_NAME = 'Four-donor chain along [110]';

export const DEMO_ACCOUNTS: DemoAccount[] = [
  { email: 'maren.oduya@fenwick-moor.example', password: DEMO_PASSWORD, displayName: 'Maren Oduya', siteRole: 'admin', projectRole: 'owner' },
  { email: 'tomasz.reyl@fenwick-moor.example', password: DEMO_PASSWORD, displayName: 'Tomasz Reyl', siteRole: 'member', projectRole: 'editor' },
];

/**
 * Four P donors on substitutional sites along [110], 6a·√2 ≈ 4.61 nm apart.
 *
 *   y
 *   ▲          P4 (9a, 9a, 0)
 *   │       P3 (3a, 3a, 0)
 *   │    P2 (−3a, −3a, 0)
 *   │ P1 (−9a, −9a, 0)
 *   └────────────────────► x        all at z = 0, chain centred on the origin
 *
 * Integer multiples of a in every coordinate are corners of the conventional cubic cell,
 * which are lattice sites of the diamond structure, so no site sits between atoms
 * (a = 0.5431020511 nm, CODATA 2018).
 */
export function demoDesign(): DesignDocument {
  const a = SI_LATTICE_CONSTANT_NM;
  const steps = [-9, -3, 3, 9];
  return designSchema.parse({
    format: 'tetrawell-design',
    version: 1,
    name: DEMO_PROJECT_NAME,
    host: { material: 'Si', epsilonR: SI_EPSILON_R, latticeConstantNm: a },
    sites: steps.map((k, i) => ({ id: `P${i + 1}`, species: 'P', position: [k * a, k * a, 0], electrons: 1 })),
    domain: { center: [0, 0, 0], halfExtentsNm: [25, 25, 25], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 500_000 },
  });
}

/** Designs of the demo project besides the four-donor chain (all invented examples). */
export const DEMO_CHAIN6_NAME = 'Six-donor chain, about 4 nm pitch';
export const DEMO_SQUARE_NAME = '3 × 3 square array, about 4.3 nm pitch';

function demoDocument(name: string, sites: DesignDocument['sites'], halfExtentNm: number): DesignDocument {
  return designSchema.parse({
    format: 'tetrawell-design',
    version: 1,
    name,
    host: { material: 'Si', epsilonR: SI_EPSILON_R, latticeConstantNm: SI_LATTICE_CONSTANT_NM },
    sites,
    domain: { center: [0, 0, 0], halfExtentsNm: [halfExtentNm, halfExtentNm, halfExtentNm], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 500_000 },
  });
}

/**
 * A six-donor P chain along [100] at a 4 nm target pitch (snapped to the lattice), in two saved
 * versions: first a tight 15 nm box, then the box widened to 30 nm (the far-field check's advice).
 */
export function demoChainVersions(): DesignDocument[] {
  const sites = generateArray({ kind: 'chain', nx: 6, spacingNm: 4, latticeConstantNm: SI_LATTICE_CONSTANT_NM, idPrefix: 'c' });
  return [demoDocument(DEMO_CHAIN6_NAME, sites, 15), demoDocument(DEMO_CHAIN6_NAME, sites, 30)];
}

/** A 3 × 3 square array of P donors, 8 lattice constants (≈ 4.34 nm) apart, in a 30 nm box. */
export function demoSquareDesign(): DesignDocument {
  const sites = generateArray({ kind: 'square', nx: 3, ny: 3, spacingNm: 8 * SI_LATTICE_CONSTANT_NM, latticeConstantNm: SI_LATTICE_CONSTANT_NM, idPrefix: 'q' });
  return demoDocument(DEMO_SQUARE_NAME, sites, 30);
}

export async function seedDemoIfEmpty(knex: Knex, opts: { bcryptRounds?: number } = {}): Promise<DemoSeedResult> {
  const rounds = opts.bcryptRounds ?? 12;
  const seeded = await knex.transaction(async (trx) => {
    // serialise concurrent seeders: the second waits, then sees users and stops
    await trx.raw('LOCK TABLE users IN SHARE ROW EXCLUSIVE MODE');
    if ((await usersRepo(trx).count()) > 0) return false;
    const ids: number[] = [];
    for (const acc of DEMO_ACCOUNTS) {
      const passwordHash = await bcrypt.hash(acc.password, rounds);
      const u = await usersRepo(trx).insert({ email: acc.email, passwordHash, displayName: acc.displayName, siteRole: acc.siteRole, emailVerifiedAt: new Date() });
      if (!u) throw new Error(`demo user ${acc.email} already exists`);
      ids.push(u.id);
    }
    const ownerId = ids[0];
    const project = await projectsRepo(trx).insert({
      name: DEMO_PROJECT_NAME,
      description:
        'Demo project of the (invented) Atomic Dopant Architecture Lab, Fenwick Moor University: four phosphorus donors in a row, ' +
        'a first look at on-site and inter-site Coulomb energies before a longer array is drawn.',
      createdBy: ownerId,
    });
    for (let i = 0; i < DEMO_ACCOUNTS.length; i++) await membershipsRepo(trx).insert(project.id, ids[i], DEMO_ACCOUNTS[i].projectRole);
    const designs = designsRepo(trx);
    await designs.insert(project.id, designWriteSync(demoDesign()), ownerId);
    const [chainV1, chainV2] = demoChainVersions();
    const chainId = await designs.insert(project.id, designWriteSync(chainV1), ownerId);
    // the second version saved by the editor, as a teammate would
    await designs.update(project.id, chainId, designWriteSync(chainV2), 1, ids[1]);
    await designs.insert(project.id, designWriteSync(demoSquareDesign()), ids[1]);
    await auditRepo(trx).insert({ projectId: project.id, actorId: ownerId, action: 'project.create', detail: { name: project.name, seeded: true } });
    return true;
  });
  // report the demo sign-ins only while those accounts exist
  const existing = await Promise.all(DEMO_ACCOUNTS.map((a) => usersRepo(knex).findByEmail(a.email)));
  return { seeded, accounts: DEMO_ACCOUNTS.filter((_, i) => existing[i] != null), projectName: DEMO_PROJECT_NAME };
}
