import type { DesignDocument } from '@contracts/design';
import { type Db, iso } from './db';

export interface DesignRecord {
  projectId: number;
  document: unknown;
  version: number;
  updatedAt: string;
}

interface DesignRow {
  project_id: number;
  document: unknown;
  version: number;
  updated_at: Date;
}

const toDesign = (r: DesignRow): DesignRecord => ({ projectId: r.project_id, document: r.document, version: r.version, updatedAt: iso(r.updated_at) });

export function designsRepo(db: Db) {
  return {
    async get(projectId: number): Promise<DesignRecord | null> {
      const r = await db<DesignRow>('designs').where({ project_id: projectId }).first();
      return r ? toDesign(r) : null;
    },
    async insert(projectId: number, document: DesignDocument, userId: number | null): Promise<DesignRecord> {
      const [r] = await db('designs')
        .insert({ project_id: projectId, document: JSON.stringify(document), updated_by: userId })
        .returning('*');
      return toDesign(r as DesignRow);
    },
    /** null when `version` is stale */
    async update(projectId: number, document: DesignDocument, version: number, userId: number): Promise<DesignRecord | null> {
      const [r] = await db('designs')
        .where({ project_id: projectId, version })
        .update({ document: JSON.stringify(document), version: db.raw('version + 1'), updated_by: userId, updated_at: db.fn.now() })
        .returning('*');
      return r ? toDesign(r as DesignRow) : null;
    },
  };
}
