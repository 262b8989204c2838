/**
 * The writes of a design save, as functions of a database handle: the new design (create) and the next version
 * (save, with optimistic concurrency), each in one transaction with its audit entries, and the metadata of what
 * was written. The designs service calls them with the server's pool; the process that reads a large design body
 * (server/http/designBody.child.ts) calls the same functions with a connection of its own, so a 17 MB document
 * never crosses the request thread's database socket (issue 8, item 7). One story, two callers.
 */
import type { DesignDetail } from '@contracts/api';
import { designsRepo, type DesignWrite } from '../repositories/designs';
import { projectsRepo } from '../repositories/projects';
import type { Db } from '../repositories/db';
import { notFound, staleWrite } from './errors';
import { recordAudit } from './audit';

/** everything of DesignDetail but the document */
export type DesignMeta = Omit<DesignDetail, 'document'>;

/** the metadata of a design just written */
export async function savedMeta(db: Db, projectId: number, designId: number): Promise<DesignMeta> {
  const cur = await designsRepo(db).current(projectId, designId);
  if (!cur) throw notFound('The design');
  return { id: designId, name: cur.name, version: cur.version, updatedAt: cur.updatedAt, updatedBy: cur.updatedBy };
}

/** a new design at version 1, with its audit entry; returns its id */
export async function insertDesign(db: Db, projectId: number, w: DesignWrite, userId: number, copyOf: number | undefined): Promise<number> {
  return db.transaction(async (trx) => {
    const newId = await designsRepo(trx).insert(projectId, w, userId);
    await projectsRepo(trx).touch(projectId);
    await recordAudit(trx, {
      projectId,
      actorId: userId,
      action: 'design.create',
      detail: { designId: newId, name: w.name, sites: w.siteCount, ...(copyOf !== undefined ? { copyOf } : {}) },
    });
    return newId;
  });
}

/** the next version of a design, or 409 with who saved the current one */
export async function writeVersion(db: Db, projectId: number, designId: number, w: DesignWrite, expected: number, userId: number): Promise<void> {
  await db.transaction(async (trx) => {
    const repo = designsRepo(trx);
    const before = await repo.current(projectId, designId);
    if (!before) throw notFound('The design');
    const version = await repo.update(projectId, designId, w, expected, userId);
    if (version === null) {
      const { name: _name, ...now } = before;
      // `before` was read in this transaction; re-read in case the version moved after it
      const latest = (await repo.current(projectId, designId)) ?? now;
      throw staleWrite('The design', { version: latest.version, updatedAt: latest.updatedAt, updatedBy: latest.updatedBy });
    }
    await projectsRepo(trx).touch(projectId);
    await recordAudit(trx, { projectId, actorId: userId, action: 'design.update', detail: { designId, version, sites: w.siteCount, name: w.name } });
    if (before.name !== w.name) {
      await recordAudit(trx, { projectId, actorId: userId, action: 'design.rename', detail: { designId, version, from: before.name, to: w.name } });
    }
  });
}
