import { type Db, iso } from './db';

export interface AuditRecord {
  id: number;
  at: string;
  actor: string | null;
  action: string;
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
        .select('a.id', 'a.at', 'u.display_name as actor', 'a.action', 'a.detail')
        .where('a.project_id', projectId)
        .orderBy('a.id', 'desc')
        .limit(limit);
      if (beforeId != null) q.where('a.id', '<', beforeId);
      const rows = await q;
      return rows.map((r: { id: string | number; at: Date; actor: string | null; action: string; detail: Record<string, unknown> }) => ({
        id: Number(r.id),
        at: iso(r.at),
        actor: r.actor,
        action: r.action,
        detail: r.detail ?? {},
      }));
    },
  };
}
export type AuditRepo = ReturnType<typeof auditRepo>;
