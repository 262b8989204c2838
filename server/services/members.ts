/**
 * Membership changes. The rule that a project always keeps an owner is enforced here,
 * under a row lock on the owner memberships, so two concurrent demotions cannot both pass.
 */
import type { Member } from '@contracts/api';
import type { ProjectRole } from '@contracts/roles';
import { membershipsRepo } from '../repositories/memberships';
import { conflict, notFound, staleWrite } from './errors';
import { recordAudit } from './audit';
import type { ServiceDeps } from './context';

const LAST_OWNER = 'A project needs at least one owner. Make someone else an owner first.';

export function memberService(deps: ServiceDeps) {
  const { db } = deps;
  return {
    async list(projectId: number): Promise<Member[]> {
      return membershipsRepo(db).list(projectId);
    },

    async changeRole(projectId: number, targetUserId: number, role: ProjectRole, version: number, actorId: number): Promise<Member> {
      return db.transaction(async (trx) => {
        const repo = membershipsRepo(trx);
        const owners = await repo.lockOwners(projectId);
        const current = await repo.find(projectId, targetUserId);
        if (!current) throw notFound('The member');
        if (current.version !== version) throw staleWrite("This member's role");
        if (current.role === 'owner' && role !== 'owner' && owners.length <= 1) throw conflict(LAST_OWNER);
        const updated = await repo.updateRole(projectId, targetUserId, role, version);
        if (!updated) throw staleWrite("This member's role");
        if (current.role !== role) {
          await recordAudit(trx, {
            projectId,
            actorId,
            action: 'member.role_change',
            detail: { userId: targetUserId, email: current.email, from: current.role, to: role },
          });
        }
        return { ...current, role: updated.role, version: updated.version };
      });
    },

    /** remove a member; `actorId === targetUserId` is someone leaving */
    async remove(projectId: number, targetUserId: number, actorId: number): Promise<void> {
      await db.transaction(async (trx) => {
        const repo = membershipsRepo(trx);
        const owners = await repo.lockOwners(projectId);
        const current = await repo.find(projectId, targetUserId);
        if (!current) throw notFound('The member');
        if (current.role === 'owner' && owners.length <= 1) throw conflict(LAST_OWNER);
        await repo.delete(projectId, targetUserId);
        const leaving = actorId === targetUserId;
        await recordAudit(trx, {
          projectId,
          actorId,
          action: leaving ? 'member.leave' : 'member.remove',
          detail: { userId: targetUserId, email: current.email, role: current.role },
        });
      });
    },
  };
}
export type MemberService = ReturnType<typeof memberService>;
