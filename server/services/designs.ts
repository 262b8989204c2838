/**
 * A project's design document: one per project, versioned for optimistic concurrency.
 * Every document that reaches the database has passed `designSchema`.
 */
import { designSchema, type DesignDocument } from '@contracts/design';
import { designsRepo } from '../repositories/designs';
import { projectsRepo } from '../repositories/projects';
import type { Db } from '../repositories/db';
import { AppError, staleWrite } from './errors';
import { recordAudit } from './audit';
import type { ServiceDeps } from './context';

import { SI_EPSILON_R, SI_LATTICE_CONSTANT_NM } from '../../geometry/units';

/**
 * The design a new project starts with: silicon host, no sites yet, a 40 nm box with a
 * multipole boundary. The numbers are starting points the user is expected to change.
 */
export function emptyDesign(name: string): DesignDocument {
  return {
    format: 'tetrawell-design',
    version: 1,
    name: name.slice(0, 200) || 'Untitled design',
    host: { material: 'Si', epsilonR: SI_EPSILON_R, latticeConstantNm: SI_LATTICE_CONSTANT_NM },
    sites: [],
    enclosure: { center: [0, 0, 0], halfExtentsNm: [20, 20, 20], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 500_000 },
  };
}

export interface ProjectDesign {
  design: DesignDocument;
  version: number;
  updatedAt: string;
}

export function designService(deps: ServiceDeps) {
  /**
   * The save itself, for a document validated already: either the object, or its JSON text as the off-thread
   * validator (server/http/designBody.ts) returns it for large documents, so the request thread never builds or
   * serialises a 100,000-site object.
   */
  async function putValidated(
    projectId: number,
    doc: { document: DesignDocument | { json: string }; name: string; siteCount: number },
    version: number,
    userId: number,
  ): Promise<{ version: number; updatedAt: string }> {
    return deps.db.transaction(async (trx) => {
      const designs = designsRepo(trx);
      if (!(await designs.exists(projectId))) await designs.insert(projectId, emptyDesign(doc.name), userId);
      const rec = await designs.update(projectId, doc.document, version, userId);
      if (!rec) throw staleWrite('The design');
      await projectsRepo(trx).touch(projectId);
      await recordAudit(trx, {
        projectId,
        actorId: userId,
        action: 'design.update',
        detail: { version: rec.version, sites: doc.siteCount, name: doc.name },
      });
      return rec;
    });
  }

  return {
    /** create the starting design inside the project-creation transaction */
    async createFor(trx: Db, projectId: number, name: string, userId: number): Promise<void> {
      await designsRepo(trx).insert(projectId, emptyDesign(name), userId);
    },

    async get(projectId: number): Promise<ProjectDesign> {
      let rec = await designsRepo(deps.db).get(projectId);
      // projects created outside the API (hand-written SQL, older data) get their design on first read
      rec ??= await designsRepo(deps.db).insert(projectId, emptyDesign('Untitled design'), null);
      const parsed = designSchema.safeParse(rec.document);
      if (!parsed.success) {
        // a stored document that no longer matches the schema (e.g. after a format change) must not be served as valid
        throw new AppError('unprocessable', 'The stored design does not match the current design format. Save a corrected design to replace it.');
      }
      return { design: parsed.data, version: rec.version, updatedAt: rec.updatedAt };
    },

    async put(projectId: number, design: DesignDocument, version: number, userId: number): Promise<ProjectDesign> {
      const saved = await putValidated(projectId, { document: design, name: design.name, siteCount: design.sites.length }, version, userId);
      return { design, ...saved };
    },

    putValidated,
  };
}
export type DesignService = ReturnType<typeof designService>;
