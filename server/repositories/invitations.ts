import type { ProjectRole } from '@contracts/roles';
import { type Db, iso } from './db';

export interface InvitationRecord {
  id: number;
  projectId: number;
  email: string;
  role: ProjectRole;
  invitedBy: string;
  createdAt: string;
  expiresAt: string;
}

export interface InvitationByToken extends InvitationRecord {
  projectName: string;
  /** the inviting account; null when it was deleted */
  inviterId: number | null;
  /** accepted, revoked or expired invitations are not usable */
  usable: boolean;
}

interface InvitationRow {
  id: number;
  project_id: number;
  email: string;
  role: ProjectRole;
  inviter_name: string | null;
  inviter_id: number | null;
  created_at: Date;
  expires_at: Date;
  accepted_at: Date | null;
  revoked_at: Date | null;
  project_name?: string;
}

const toInvitation = (r: InvitationRow): InvitationRecord => ({
  id: r.id,
  projectId: r.project_id,
  email: r.email,
  role: r.role,
  invitedBy: r.inviter_name ?? 'a former member',
  createdAt: iso(r.created_at),
  expiresAt: iso(r.expires_at),
});

export function invitationsRepo(db: Db) {
  const base = () =>
    db<InvitationRow>('invitations as i')
      .leftJoin('users as u', 'u.id', 'i.invited_by')
      .select('i.id', 'i.project_id', 'i.email', 'i.role', 'u.display_name as inviter_name', 'i.invited_by as inviter_id', 'i.created_at', 'i.expires_at', 'i.accepted_at', 'i.revoked_at');
  const pending = (now: Date) => base().whereNull('i.accepted_at').whereNull('i.revoked_at').where('i.expires_at', '>', now);
  return {
    async listPending(projectId: number, now: Date): Promise<InvitationRecord[]> {
      const rows = await pending(now).where('i.project_id', projectId).orderBy([{ column: 'i.created_at', order: 'desc' }, { column: 'i.id', order: 'desc' }]);
      return rows.map(toInvitation);
    },
    async findPending(projectId: number, invitationId: number, now: Date): Promise<InvitationRecord | null> {
      const r = await pending(now).where('i.project_id', projectId).andWhere('i.id', invitationId).first();
      return r ? toInvitation(r) : null;
    },
    async insert(i: { projectId: number; email: string; role: ProjectRole; tokenHash: string; invitedBy: number; expiresAt: Date }): Promise<number> {
      const [r] = await db('invitations')
        .insert({ project_id: i.projectId, email: i.email, role: i.role, token_hash: i.tokenHash, invited_by: i.invitedBy, expires_at: i.expiresAt })
        .returning('id');
      return (r as { id: number }).id;
    },
    async findById(id: number): Promise<InvitationRecord | null> {
      const r = await base().where('i.id', id).first();
      return r ? toInvitation(r) : null;
    },
    /** revoke any still-open invitation of `email` to the project; returns how many */
    async revokePendingForEmail(projectId: number, email: string, now: Date): Promise<number> {
      return db('invitations')
        .where({ project_id: projectId, email })
        .whereNull('accepted_at')
        .whereNull('revoked_at')
        .where('expires_at', '>', now)
        .update({ revoked_at: now });
    },
    async revoke(invitationId: number, now: Date): Promise<boolean> {
      return (await db('invitations').where({ id: invitationId }).whereNull('accepted_at').whereNull('revoked_at').update({ revoked_at: now })) > 0;
    },
    /** the invitation a link token points at, locked for update when inside a transaction that asks */
    async findByTokenHash(tokenHash: string, now: Date, opts: { lock?: boolean } = {}): Promise<InvitationByToken | null> {
      const q = base().join('projects as p', 'p.id', 'i.project_id').select('p.name as project_name').where('i.token_hash', tokenHash);
      if (opts.lock) q.forUpdate('i');
      const r = await q.first();
      if (!r) return null;
      const usable = r.accepted_at == null && r.revoked_at == null && r.expires_at.getTime() > now.getTime();
      return { ...toInvitation(r), projectName: r.project_name ?? '', inviterId: r.inviter_id ?? null, usable };
    },
    async markAccepted(invitationId: number, userId: number, now: Date): Promise<void> {
      await db('invitations').where({ id: invitationId }).update({ accepted_at: now, accepted_by: userId });
    },
  };
}
export type InvitationsRepo = ReturnType<typeof invitationsRepo>;
