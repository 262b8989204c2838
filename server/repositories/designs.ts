/**
 * Designs of a project and their stored versions.
 *
 * `designs` holds each design's current document and the figures the project page lists
 * (name, site count, worst far-field bound); `design_versions` holds every saved document and
 * is append-only: this module has no update or delete path for it (a database trigger refuses
 * UPDATE too; rows go only with their design).
 *
 * Documents travel as JSON text prepared by the caller (`documentJson`), so a large document is
 * stringified once per save.
 */
import { migrateDesign } from '@contracts/design';
import { type Db, iso } from './db';

export interface DesignRecord {
  id: number;
  projectId: number;
  name: string;
  document: unknown;
  version: number;
  siteCount: number;
  worstRelBound: number | null;
  updatedAt: string;
  /** display name of who saved last; null when unknown */
  updatedBy: string | null;
}

export type DesignSummaryRecord = Omit<DesignRecord, 'document' | 'projectId'> & {
  /** the document's refinement.targetRelError, read in the database so the list never loads documents; null when absent */
  targetRelError: number | null;
};

export interface DesignVersionRecord {
  version: number;
  name: string;
  siteCount: number;
  sha256: string;
  createdAt: string;
  createdBy: string | null;
}

/**
 * What a save writes: the current row and the new version row get the same figures. The document is JSON text,
 * or (from the design-body process, server/http/designBody.child.ts) `documentJsonb`: the bytes of PostgreSQL's
 * jsonb binary input, a version byte 1 then the UTF-8 text (PostgreSQL docs, jsonb_recv in
 * src/backend/utils/adt/jsonb.c). pg sends a Buffer parameter in binary format as it is, so a 17 MB document is
 * never encoded to UTF-8 on the request thread (it was, twice: current row and version row).
 */
export type DesignWrite = {
  name: string;
  siteCount: number;
  worstRelBound: number | null;
  sha256: string;
} & ({ documentJson: string; documentJsonb?: undefined } | { documentJsonb: Buffer; documentJson?: undefined });

/** The document as the query parameter: text, or the jsonb binary bytes (a Buffer goes in binary format). */
const documentParam = (w: DesignWrite): string | Buffer => w.documentJsonb ?? w.documentJson;

interface DesignRow {
  id: number;
  project_id: number;
  name: string;
  document?: unknown;
  version: number;
  site_count: number;
  worst_rel_bound: number | null;
  updated_at: Date;
  updated_by_name: string | null;
}

/**
 * Stored documents keep the format version they were saved in (versions are append-only); readers get
 * them in the current format. A document the migration cannot read is handed back as it is, so the
 * validator that reads it next names what is wrong.
 */
const current = (doc: unknown): unknown => {
  if (doc === undefined) return doc;
  const m = migrateDesign(doc);
  return m.ok ? m.doc : doc;
};

const toDesign = (r: DesignRow): DesignRecord => ({
  id: r.id,
  projectId: r.project_id,
  name: r.name,
  document: current(r.document),
  version: r.version,
  siteCount: r.site_count,
  worstRelBound: r.worst_rel_bound === null ? null : Number(r.worst_rel_bound),
  updatedAt: iso(r.updated_at),
  updatedBy: r.updated_by_name,
});

interface VersionRow {
  version: number;
  name: string;
  site_count: number;
  sha256: string;
  created_at: Date;
  created_by_name: string | null;
  document?: unknown;
}

const toVersion = (r: VersionRow): DesignVersionRecord => ({
  version: r.version,
  name: r.name,
  siteCount: r.site_count,
  sha256: r.sha256,
  createdAt: iso(r.created_at),
  createdBy: r.created_by_name,
});

const SUMMARY_COLUMNS = ['d.id', 'd.project_id', 'd.name', 'd.version', 'd.site_count', 'd.worst_rel_bound', 'd.updated_at', 'u.display_name as updated_by_name'];

export function designsRepo(db: Db) {
  const base = () => db('designs as d').leftJoin('users as u', 'u.id', 'd.updated_by');
  const repo = {
    /** the project's designs, oldest first (the project's starting design leads) */
    async listForProject(projectId: number): Promise<DesignSummaryRecord[]> {
      const rows = (await base()
        .select([...SUMMARY_COLUMNS, db.raw(`(d.document #>> '{refinement,targetRelError}')::float8 as target_rel_error`)])
        .where('d.project_id', projectId)
        .orderBy('d.id')) as (DesignRow & { target_rel_error: number | string | null })[];
      return rows.map((r) => {
        const { document: _d, projectId: _p, ...rest } = toDesign(r);
        const t = r.target_rel_error === null ? null : Number(r.target_rel_error);
        return { ...rest, targetRelError: t !== null && Number.isFinite(t) ? t : null };
      });
    },

    /** a design of the project, with its document; null when it is not there */
    async get(projectId: number, designId: number): Promise<DesignRecord | null> {
      const r = (await base().select([...SUMMARY_COLUMNS, 'd.document']).where({ 'd.project_id': projectId, 'd.id': designId }).first()) as DesignRow | undefined;
      return r ? toDesign(r) : null;
    },

    /** name and current version, who saved it and when (for a 409), without the document; null when the design is not there */
    async current(projectId: number, designId: number): Promise<{ name: string; version: number; updatedAt: string; updatedBy: string | null } | null> {
      const r = (await base().select(SUMMARY_COLUMNS).where({ 'd.project_id': projectId, 'd.id': designId }).first()) as DesignRow | undefined;
      return r ? { name: r.name, version: r.version, updatedAt: iso(r.updated_at), updatedBy: r.updated_by_name } : null;
    },

    /** a new design at version 1, with its version row */
    async insert(projectId: number, w: DesignWrite, userId: number | null): Promise<number> {
      const [r] = (await db('designs')
        .insert({
          project_id: projectId,
          name: w.name,
          document: documentParam(w),
          site_count: w.siteCount,
          worst_rel_bound: w.worstRelBound,
          created_by: userId,
          updated_by: userId,
        })
        .returning(['id', 'version'])) as { id: number; version: number }[];
      await repo.insertVersionFromCurrent(r.id, w.sha256, userId);
      return r.id;
    },

    /** the next version, when `version` is still current: writes the current row and a version row; null when stale or gone */
    async update(projectId: number, designId: number, w: DesignWrite, version: number, userId: number): Promise<number | null> {
      const [r] = (await db('designs')
        .where({ project_id: projectId, id: designId, version })
        .update({
          name: w.name,
          document: documentParam(w),
          site_count: w.siteCount,
          worst_rel_bound: w.worstRelBound,
          version: db.raw('version + 1'),
          updated_by: userId,
          updated_at: db.fn.now(),
        })
        .returning(['version'])) as { version: number }[];
      if (!r) return null;
      await repo.insertVersionFromCurrent(designId, w.sha256, userId);
      return r.version;
    },

    /**
     * The version row of what the current row now holds, copied inside PostgreSQL: the document (up to ~17 MB)
     * travels from the server once per save, not twice (current row and version row). Call it in the
     * transaction that wrote the current row.
     */
    async insertVersionFromCurrent(designId: number, sha256: string, userId: number | null): Promise<void> {
      await db.raw(
        `INSERT INTO design_versions (design_id, version, name, site_count, document, sha256, created_by)
         SELECT id, version, name, site_count, document, ?, ? FROM designs WHERE id = ?`,
        [sha256, userId, designId],
      );
    },

    async delete(projectId: number, designId: number): Promise<boolean> {
      return (await db('designs').where({ project_id: projectId, id: designId }).delete()) > 0;
    },

    /** newest first */
    async listVersions(designId: number): Promise<DesignVersionRecord[]> {
      const rows = (await db('design_versions as v')
        .leftJoin('users as u', 'u.id', 'v.created_by')
        .select('v.version', 'v.name', 'v.site_count', 'v.sha256', 'v.created_at', 'u.display_name as created_by_name')
        .where('v.design_id', designId)
        .orderBy('v.version', 'desc')) as VersionRow[];
      return rows.map(toVersion);
    },

    /**
     * A version's document as JSON text, for a job thread that parses it itself: `document::text` comes from
     * PostgreSQL as a string, so the caller's thread neither parses the jsonb (pg would) nor stringifies it again.
     */
    async getVersionText(designId: number, version: number): Promise<string | null> {
      const r = (await db('design_versions').where({ design_id: designId, version }).first(db.raw('document::text as document'))) as { document: string } | undefined;
      return r?.document ?? null;
    },

    async getVersion(designId: number, version: number): Promise<(DesignVersionRecord & { document: unknown }) | null> {
      const r = (await db('design_versions as v')
        .leftJoin('users as u', 'u.id', 'v.created_by')
        .select('v.version', 'v.name', 'v.site_count', 'v.sha256', 'v.created_at', 'u.display_name as created_by_name', 'v.document')
        .where({ 'v.design_id': designId, 'v.version': version })
        .first()) as VersionRow | undefined;
      return r ? { ...toVersion(r), document: current(r.document) } : null;
    },
  };
  return repo;
}
