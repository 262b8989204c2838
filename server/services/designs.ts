/**
 * The designs of a project: many per project, each save kept as an append-only design version.
 * Every document that reaches the database has passed `designSchema`; the design's `name` and
 * its document's `name` are kept equal.
 *
 * A save stores two figures beside the document (server/workers/designFigures.ts): the sha256
 * of the canonical JSON and the far-field check's worst relative bound, computed before the
 * transaction (in a worker thread for large designs) so no database lock waits on them.
 */
import { designSchema, type DesignDocument } from '@contracts/design';
import type { DesignDetail, DesignSummary, designExportFormats } from '@contracts/api';

type DesignExportFormat = (typeof designExportFormats)[number];
import { designsRepo, type DesignRecord, type DesignVersionRecord, type DesignWrite } from '../repositories/designs';
import { projectsRepo } from '../repositories/projects';
import type { Db } from '../repositories/db';
import { AppError, notFound } from './errors';
import { recordAudit } from './audit';
import * as writes from './designWrites';
import type { ServiceDeps } from './context';
import { computeFigures, figureComputer } from '../workers/designFigures';
import { ImportRefused, writeCsv, writePlacement, writeXyz, type ImportIssue, type Site } from '../formats';

import { SI_EPSILON_R, SI_LATTICE_CONSTANT_NM } from '../../geometry/units';

/**
 * The design a new project (or an empty new design) starts with: silicon host, no sites yet,
 * a 40 nm box with a multipole boundary. The numbers are starting points the user is expected to change.
 */
export function emptyDesign(name: string): DesignDocument {
  return {
    format: 'tetrawell-design',
    version: 2,
    name: name.slice(0, 200) || 'Untitled design',
    host: { material: 'Si', epsilonR: SI_EPSILON_R, latticeConstantNm: SI_LATTICE_CONSTANT_NM },
    sites: [],
    domain: { center: [0, 0, 0], halfExtentsNm: [20, 20, 20], boundary: { kind: 'multipole', order: 2 } },
    refinement: { order: 2, targetRelError: 0.01, maxElements: 500_000 },
  };
}

/** What a save writes, for a document that passed the schema (synchronous: small designs only). */
export function designWriteSync(doc: DesignDocument): DesignWrite {
  const f = computeFigures(doc);
  return { name: doc.name, documentJson: JSON.stringify(doc), siteCount: doc.sites.length, ...f };
}

/** A file name from a design name: ASCII letters, digits and dashes, at most 80 characters. */
/** The UTF-8 JSON text of a write's document: bytes (a view of the jsonb input, no copy) or the string it is. */
export function documentText(w: DesignWrite): string | Buffer {
  return w.documentJsonb ? w.documentJsonb.subarray(1) : w.documentJson;
}

export function fileBaseName(name: string): string {
  const slug = name
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 80)
    .replace(/-+$/, '');
  return slug || 'design';
}

export type DesignCreateInput = { name: string; copyOf: number } | { name: string; document?: DesignDocument };

export function storedDocument(rec: { document: unknown }): DesignDocument {
  const parsed = designSchema.safeParse(rec.document);
  if (!parsed.success) {
    // a stored document that no longer matches the schema (e.g. after a format change) must not be served as valid
    throw new AppError('unprocessable', 'The stored design does not match the current design format. Save a corrected design to replace it.');
  }
  return parsed.data;
}

/** A design's answer without its document (a large document is sent as the JSON text it was stored from). */
export type { DesignMeta } from './designWrites';
import type { DesignMeta } from './designWrites';

const toDetail = (rec: DesignRecord, document: DesignDocument): DesignDetail => ({
  id: rec.id,
  name: rec.name,
  document,
  version: rec.version,
  updatedAt: rec.updatedAt,
  updatedBy: rec.updatedBy,
});

export function designService(deps: ServiceDeps) {
  const { db } = deps;
  const figures = figureComputer();

  async function prepare(doc: DesignDocument): Promise<DesignWrite> {
    const documentJson = JSON.stringify(doc);
    const f = await figures.compute(doc, documentJson);
    return { name: doc.name, documentJson, siteCount: doc.sites.length, ...f };
  }

  /** the answer to a save: the document just written (no re-read and re-parse of a large jsonb) and the row's metadata */
  async function saved(projectId: number, designId: number, doc: DesignDocument): Promise<DesignDetail> {
    const cur = await designsRepo(db).current(projectId, designId);
    if (!cur) throw notFound('The design');
    return { id: designId, name: cur.name, document: doc, version: cur.version, updatedAt: cur.updatedAt, updatedBy: cur.updatedBy };
  }

  async function mustGet(projectId: number, designId: number): Promise<DesignRecord> {
    const rec = await designsRepo(db).get(projectId, designId);
    if (!rec) throw notFound('The design');
    return rec;
  }

  const savedMeta = (projectId: number, designId: number) => writes.savedMeta(db, projectId, designId);
  const insertDesign = (projectId: number, w: DesignWrite, userId: number, copyOf: number | undefined) => writes.insertDesign(db, projectId, w, userId, copyOf);
  const writeVersion = (projectId: number, designId: number, w: DesignWrite, expected: number, userId: number) =>
    writes.writeVersion(db, projectId, designId, w, expected, userId);

  const service = {
    /** create the starting design inside the project-creation transaction */
    async createFor(trx: Db, projectId: number, name: string, userId: number): Promise<number> {
      return designsRepo(trx).insert(projectId, designWriteSync(emptyDesign(name)), userId);
    },

    async list(projectId: number): Promise<DesignSummary[]> {
      return designsRepo(db).listForProject(projectId);
    },

    async get(projectId: number, designId: number): Promise<DesignDetail> {
      const rec = await mustGet(projectId, designId);
      return toDetail(rec, storedDocument(rec));
    },

    async create(projectId: number, input: DesignCreateInput, userId: number): Promise<DesignDetail> {
      let source: DesignDocument;
      let copyOf: number | undefined;
      if ('copyOf' in input) {
        const from = await designsRepo(db).get(projectId, input.copyOf);
        if (!from) throw new AppError('validation_failed', 'Some fields of the design form need attention.', [{ path: ['copyOf'], message: 'is not a design of this project' }]);
        source = storedDocument(from);
        copyOf = from.id;
      } else {
        source = input.document ?? emptyDesign(input.name);
      }
      const doc: DesignDocument = { ...source, name: input.name };
      const id = await insertDesign(projectId, await prepare(doc), userId, copyOf);
      return saved(projectId, id, doc);
    },

    /**
     * Create from a document already validated, serialised and measured off the request thread (a large body,
     * server/http/designBody.ts); answers the metadata, the caller sends `w.documentJson` as the document.
     */
    async createPrepared(projectId: number, w: DesignWrite, userId: number): Promise<DesignMeta> {
      const id = await insertDesign(projectId, w, userId, undefined);
      return savedMeta(projectId, id);
    },

    async update(projectId: number, designId: number, input: { document: DesignDocument; version: number; name?: string }, userId: number): Promise<DesignDetail> {
      const doc: DesignDocument = { ...input.document, name: input.name ?? input.document.name };
      await writeVersion(projectId, designId, await prepare(doc), input.version, userId);
      return saved(projectId, designId, doc);
    },

    /** Save a document prepared off the request thread (see createPrepared). */
    async updatePrepared(projectId: number, designId: number, w: DesignWrite, version: number, userId: number): Promise<DesignMeta> {
      await writeVersion(projectId, designId, w, version, userId);
      return savedMeta(projectId, designId);
    },

    async remove(projectId: number, designId: number, userId: number): Promise<void> {
      await db.transaction(async (trx) => {
        const rec = await designsRepo(trx).current(projectId, designId);
        if (!rec || !(await designsRepo(trx).delete(projectId, designId))) throw notFound('The design');
        await projectsRepo(trx).touch(projectId);
        await recordAudit(trx, { projectId, actorId: userId, action: 'design.delete', detail: { designId, name: rec.name, version: rec.version } });
      });
    },

    async versions(projectId: number, designId: number): Promise<DesignVersionRecord[]> {
      if (!(await designsRepo(db).current(projectId, designId))) throw notFound('The design');
      return designsRepo(db).listVersions(designId);
    },

    async version(projectId: number, designId: number, version: number): Promise<DesignVersionRecord & { document: DesignDocument }> {
      if (!(await designsRepo(db).current(projectId, designId))) throw notFound('The design');
      const v = await designsRepo(db).getVersion(designId, version);
      if (!v) throw notFound('That version of the design');
      return { ...v, document: storedDocument(v) };
    },

    /**
     * Parse and check an uploaded site file against the design's current domain box and lattice.
     * Writes nothing: the client previews the result and saves with a PUT when the user accepts.
     */
    async importFile(projectId: number, designId: number, file: { bytes: Uint8Array; name: string }): Promise<{ sites: Site[]; errors: ImportIssue[] }> {
      const doc = storedDocument(await mustGet(projectId, designId));
      try {
        const { sites, errors } = await figures.importSites(file.bytes, file.name, { domain: doc.domain, latticeConstantNm: doc.host.latticeConstantNm });
        return { sites, errors };
      } catch (e) {
        if (e instanceof ImportRefused) throw new AppError('unprocessable', e.message);
        throw e;
      }
    },

    /** The design as a download: body, content type and a file name made from the design name. */
    async exportFile(projectId: number, designId: number, format: DesignExportFormat): Promise<{ body: string; contentType: string; fileName: string }> {
      const rec = await mustGet(projectId, designId);
      const doc = storedDocument(rec);
      const base = fileBaseName(rec.name);
      switch (format) {
        case 'json':
          return { body: `${JSON.stringify(doc, null, 2)}\n`, contentType: 'application/json; charset=utf-8', fileName: `${base}.json` };
        case 'csv':
          return { body: writeCsv(doc.sites), contentType: 'text/csv; charset=utf-8', fileName: `${base}.csv` };
        case 'xyz':
          return {
            body: writeXyz(doc.sites, `${doc.name} | Tetrawell design ${rec.id} version ${rec.version}, positions in angstrom`),
            contentType: 'chemical/x-xyz; charset=utf-8',
            fileName: `${base}.xyz`,
          };
        case 'placement':
          return { body: writePlacement(doc.sites, { name: doc.name, latticeConstantNm: doc.host.latticeConstantNm }), contentType: 'text/plain; charset=utf-8', fileName: `${base}.placement.txt` };
      }
    },

    /** stop the worker thread (server shutdown) */
    close: () => figures.close(),
  };
  return service;
}
export type DesignService = ReturnType<typeof designService>;
