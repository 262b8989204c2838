import { type Db, iso } from './db';

export interface AuditRecord {
  id: number;
  at: string;
  actor: string | null;
  action: string;
  /** display name of the user named by detail.userId (role changes, removals), for sentences with names */
  subject: string | null;
  detail: Record<string, unknown>;
}

export interface AuditInput {
  projectId: number | null;
  actorId: number | null;
  action: string;
  detail?: Record<string, unknown>;
}

export function auditRepo(db: Db) {
  return {
    async insert(e: AuditInput): Promise<void> {
      await db('audit_events').insert({ project_id: e.projectId, actor_id: e.actorId, action: e.action, detail: JSON.stringify(e.detail ?? {}) });
    },
    /** newest first */
    async listForProject(projectId: number, limit: number, beforeId?: number): Promise<AuditRecord[]> {
      const q = db('audit_events as a')
        .leftJoin('users as u', 'u.id', 'a.actor_id')
        // detail.userId is written by the services as a JSON number; compared as text so a
        // malformed value can never make the cast (and the whole list) fail.
        .leftJoin('users as s', (j) => j.on(db.raw("s.id::text = a.detail->>'userId'")))
        .select('a.id', 'a.at', 'u.display_name as actor', 's.display_name as subject', 'a.action', 'a.detail')
        .where('a.project_id', projectId)
        .orderBy('a.id', 'desc')
        .limit(limit);
      if (beforeId != null) q.where('a.id', '<', beforeId);
      const rows = await q;
      return rows.map((r: { id: string | number; at: Date; actor: string | null; subject: string | null; action: string; detail: Record<string, unknown> }) => ({
        id: Number(r.id),
        at: iso(r.at),
        actor: r.actor,
        subject: r.subject,
        action: r.action,
        detail: r.detail ?? {},
      }));
    },
  };
}
export type AuditRepo = ReturnType<typeof auditRepo>;
