/**
 * Revisions: immutable results of finished jobs, and their files as compressed pieces
 * (server/jobs/storage.ts). `insert` writes the revision, its file list and every piece; callers
 * run it inside the transaction that also marks the job succeeded, so a revision is readable
 * only whole. There is no update path (a trigger refuses UPDATE as well).
 */
import type { JobKind, JobOptions, Revision } from '@contracts/api';
import type { ProjectRole } from '@contracts/roles';
import { type Db, iso } from './db';
import { isoText, runStatement, type Statement } from './statements';

export type RevisionFileName = Revision['files'][number]['name'];

export interface RevisionInsert {
  projectId: number;
  jobId: number | null;
  designId: number;
  designVersion: number;
  designSha256: string;
  kind: JobKind;
  options: JobOptions;
  optionsKey: string;
  software: { version: string; commit: string | null };
  timings: Record<string, number>;
  summary: Record<string, unknown>;
  files: { name: string; contentType: string; bytes: number; chunks: Uint8Array[] }[];
  createdBy: number | null;
}

export interface RevisionRecord extends Revision {
  projectId: number;
  storedBytes: number;
  designName: string;
}

interface RevisionRow {
  id: number;
  project_id: number;
  job_id: number | null;
  design_id: number;
  design_name: string;
  design_version: number;
  design_sha256: string;
  kind: JobKind;
  options: JobOptions;
  software_version: string;
  software_commit: string | null;
  timings: Record<string, number>;
  summary?: Record<string, unknown>;
  stored_bytes: string | number;
  created_by_name: string | null;
  created_at: Date;
}

interface FileRow {
  revision_id: number;
  name: RevisionFileName;
  content_type: string;
  bytes: string | number;
  stored_bytes: string | number;
  chunks: number;
}

export interface StoredFile {
  name: RevisionFileName;
  contentType: string;
  bytes: number;
  chunks: number;
}

const ORDER: RevisionFileName[] = ['mesh.vtu', 'mesh.vtk', 'mesh.twmesh', 'results.json', 'results.csv', 'potential.f64'];

/** A revision as the list answers it: the one-revision answer without its summary. */
export type ListedRevision = Omit<Revision, 'summary'>;

/** A listed revision: the answer's columns only, times as ISO text (statements.ts `isoText`), and the caller's role. */
interface ListedRevisionRow {
  member_role: ProjectRole;
  id: number | null;
  kind: JobKind;
  job_id: number | null;
  design_id: number;
  design_version: number;
  design_sha256: string;
  options: JobOptions;
  software_version: string;
  software_commit: string | null;
  timings: Record<string, number>;
  /** already the answer's objects ({ name, bytes, contentType }), in the order of ORDER */
  files: Revision['files'];
  created_at: string;
  created_by_name: string | null;
}

/** the same object, key for key and in the same order, as the one-revision read's without `summary` */
const listedRevision = (r: ListedRevisionRow): ListedRevision => ({
  id: r.id!,
  kind: r.kind,
  jobId: r.job_id,
  designId: r.design_id,
  designVersion: r.design_version,
  designSha256: r.design_sha256,
  options: r.options,
  software: { version: r.software_version, commit: r.software_commit },
  timings: r.timings,
  files: r.files,
  createdAt: r.created_at,
  createdBy: r.created_by_name,
});

/**
 * Each revision's files are aggregated in the statement, already in the answer's shape and order (`ORDER`); the
 * revision's design needs no join (revisions.design_id references designs ON DELETE CASCADE).
 */
const LIST_FOR_MEMBER: Statement = {
  name: 'tetrawell-revisions-list-for-member-2',
  text: `
    SELECT m.role AS member_role, r.*
    FROM memberships m
    LEFT JOIN LATERAL (
      SELECT r.id, r.kind, r.job_id, r.design_id, r.design_version, r.design_sha256, r.options, r.software_version, r.software_commit,
             r.timings, ${isoText('r.created_at')} AS created_at, u.display_name AS created_by_name,
             (SELECT coalesce(json_agg(json_build_object('name', f.name, 'bytes', f.bytes, 'contentType', f.content_type)
                                       ORDER BY array_position(ARRAY[${ORDER.map((n) => `'${n}'`).join(', ')}]::text[], f.name)), '[]')
              FROM revision_files f WHERE f.revision_id = r.id) AS files
      FROM revisions r
      LEFT JOIN users u ON u.id = r.created_by
      WHERE r.project_id = m.project_id AND ($3::int IS NULL OR r.design_id = $3::int)
      ORDER BY r.id DESC
      LIMIT $4
    ) r ON true
    WHERE m.project_id = $1 AND m.user_id = $2
    ORDER BY r.id DESC`,
};

export function revisionsRepo(db: Db) {
  const select = (withSummary: boolean) =>
    db('revisions as r')
      .join('designs as d', 'd.id', 'r.design_id')
      .leftJoin('users as u', 'u.id', 'r.created_by')
      .select(
        'r.id', 'r.project_id', 'r.job_id', 'r.design_id', 'd.name as design_name', 'r.design_version', 'r.design_sha256', 'r.kind', 'r.options',
        'r.software_version', 'r.software_commit', 'r.timings', 'r.stored_bytes', 'r.created_at', 'u.display_name as created_by_name',
        ...(withSummary ? ['r.summary'] : []),
      );

  async function filesOf(ids: number[]): Promise<Map<number, StoredFile[]>> {
    const out = new Map<number, StoredFile[]>();
    if (!ids.length) return out;
    const rows = (await db('revision_files').whereIn('revision_id', ids)) as FileRow[];
    for (const r of rows) {
      const list = out.get(r.revision_id) ?? [];
      list.push({ name: r.name, contentType: r.content_type, bytes: Number(r.bytes), chunks: r.chunks });
      out.set(r.revision_id, list);
    }
    for (const list of out.values()) list.sort((a, b) => ORDER.indexOf(a.name) - ORDER.indexOf(b.name));
    return out;
  }

  const toRevision = (r: RevisionRow, files: StoredFile[]): RevisionRecord => ({
    id: r.id,
    projectId: r.project_id,
    kind: r.kind,
    jobId: r.job_id,
    designId: r.design_id,
    designName: r.design_name,
    designVersion: r.design_version,
    designSha256: r.design_sha256,
    options: r.options,
    software: { version: r.software_version, commit: r.software_commit },
    timings: r.timings,
    summary: r.summary ?? {},
    files: files.map((f) => ({ name: f.name, bytes: f.bytes, contentType: f.contentType })),
    storedBytes: Number(r.stored_bytes),
    createdAt: iso(r.created_at),
    createdBy: r.created_by_name,
  });

  return {
    async insert(rev: RevisionInsert): Promise<number> {
      const storedBytes = rev.files.reduce((s, f) => s + f.chunks.reduce((t, c) => t + c.length, 0), 0);
      const [row] = await db('revisions')
        .insert({
          project_id: rev.projectId,
          job_id: rev.jobId,
          design_id: rev.designId,
          design_version: rev.designVersion,
          design_sha256: rev.designSha256,
          kind: rev.kind,
          options: JSON.stringify(rev.options),
          options_key: rev.optionsKey,
          software_version: rev.software.version,
          software_commit: rev.software.commit,
          timings: JSON.stringify(rev.timings),
          summary: JSON.stringify(rev.summary),
          stored_bytes: storedBytes,
          created_by: rev.createdBy,
        })
        .returning('id');
      const id = (row as { id: number }).id;
      for (const f of rev.files) {
        await db('revision_files').insert({
          revision_id: id,
          name: f.name,
          content_type: f.contentType,
          bytes: f.bytes,
          stored_bytes: f.chunks.reduce((t, c) => t + c.length, 0),
          chunks: f.chunks.length,
        });
        // one piece per statement: a statement never carries more than one compressed MiB
        for (let seq = 0; seq < f.chunks.length; seq++) {
          await db('revision_chunks').insert({ revision_id: id, file: f.name, seq, bytes: Buffer.from(f.chunks[seq].buffer, f.chunks[seq].byteOffset, f.chunks[seq].byteLength) });
        }
      }
      return id;
    },
    async get(projectId: number, revisionId: number): Promise<RevisionRecord | null> {
      const row = (await select(true).where({ 'r.project_id': projectId, 'r.id': revisionId }).first()) as RevisionRow | undefined;
      if (!row) return null;
      return toRevision(row, (await filesOf([row.id])).get(row.id) ?? []);
    },
    /**
     * The caller's role in the project and its newest revisions (of one design, when `designId` is given) with
     * their file lists, in one statement: one database round trip where a role query, the rows and their files
     * took three. No membership: role null and no revisions. A fixed statement run as it is (statements.ts);
     * `$3` null means every design.
     */
    async listForMember(projectId: number, userId: number, opts: { designId?: number; limit: number }): Promise<{ role: ProjectRole | null; revisions: ListedRevision[] }> {
      const rows = await runStatement<ListedRevisionRow>(db, LIST_FOR_MEMBER, [projectId, userId, opts.designId ?? null, opts.limit]);
      if (!rows.length) return { role: null, revisions: [] };
      const revisions: ListedRevision[] = [];
      for (const r of rows) if (r.id !== null) revisions.push(listedRevision(r));
      return { role: rows[0]!.member_role, revisions };
    },
    /** the newest revision of this project computed from the same document, kind and options */
    async findReusable(projectId: number, designSha256: string, kind: JobKind, optionsKey: string): Promise<{ id: number } | null> {
      const row = (await db('revisions')
        .where({ project_id: projectId, design_sha256: designSha256, kind, options_key: optionsKey })
        .orderBy('id', 'desc')
        .first('id')) as { id: number } | undefined;
      return row ?? null;
    },
    async byJob(jobId: number): Promise<{ id: number } | null> {
      const row = (await db('revisions').where({ job_id: jobId }).first('id')) as { id: number } | undefined;
      return row ?? null;
    },
    async storedBytes(projectId: number): Promise<number> {
      const row = (await db('revisions').where({ project_id: projectId }).sum<{ s: string | null }[]>('stored_bytes as s').first()) as { s: string | null } | undefined;
      return Number(row?.s ?? 0);
    },
    async file(revisionId: number, name: RevisionFileName): Promise<StoredFile | null> {
      const row = (await db('revision_files').where({ revision_id: revisionId, name }).first()) as FileRow | undefined;
      return row ? { name: row.name, contentType: row.content_type, bytes: Number(row.bytes), chunks: row.chunks } : null;
    },
    async chunk(revisionId: number, name: RevisionFileName, seq: number): Promise<Uint8Array | null> {
      const row = (await db('revision_chunks').where({ revision_id: revisionId, file: name, seq }).first('bytes')) as { bytes: Buffer } | undefined;
      return row ? new Uint8Array(row.bytes.buffer, row.bytes.byteOffset, row.bytes.byteLength) : null;
    },
  };
}
export type RevisionsRepo = ReturnType<typeof revisionsRepo>;
