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
    /** does the project have its design row? (reads no document: a big one costs a long parse) */
    async exists(projectId: number): Promise<boolean> {
      return (await db('designs').where({ project_id: projectId }).first('project_id')) != null;
    },
    /**
     * null when `version` is stale. `document` may be JSON text already (validated off the request thread);
     * the answer carries no document, so a large one is not read back and parsed on the request thread.
     */
    async update(projectId: number, document: DesignDocument | { json: string }, version: number, userId: number): Promise<{ version: number; updatedAt: string } | null> {
      const json = 'json' in document && typeof document.json === 'string' ? document.json : JSON.stringify(document);
      const [r] = await db('designs')
        .where({ project_id: projectId, version })
        .update({ document: json, version: db.raw('version + 1'), updated_by: userId, updated_at: db.fn.now() } as never)
        .returning(['version', 'updated_at']);
      return r ? { version: (r as DesignRow).version, updatedAt: iso((r as DesignRow).updated_at) } : null;
    },
  };
}
