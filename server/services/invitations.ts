/**
 * Invitations by e-mail. An owner names an address and a role; the address receives a
 * one-time link; a signed-in user whose account has that address follows it and becomes
 * a member. The e-mail goes out after the invitation is committed, so a slow or failing
 * SMTP server never leaves a half-made invitation behind.
 */
import type { Invitation, Project } from '@contracts/api';
import { can, type ProjectRole } from '@contracts/roles';
import { invitationsRepo, type InvitationByToken, type InvitationRecord } from '../repositories/invitations';
import type { Db } from '../repositories/db';
import { membershipsRepo } from '../repositories/memberships';
import { projectsRepo } from '../repositories/projects';
import { usersRepo } from '../repositories/users';
import { AppError, conflict, forbidden, notFound } from './errors';
import { recordAudit } from './audit';
import { hashToken, newToken } from './tokens';
import { invitationMail } from '../mail/templates';
import type { ServiceDeps } from './context';
import { toPublicProject } from './projects';

const LINK_INVALID = 'This invitation link is not valid any more (it was used, revoked or has expired).';

const toPublic = (i: InvitationRecord): Invitation => ({
  id: i.id,
  email: i.email,
  role: i.role,
  invitedBy: i.invitedBy,
  createdAt: i.createdAt,
  expiresAt: i.expiresAt,
});

export function invitationService(deps: ServiceDeps) {
  const { db, config } = deps;
  return {
    async list(projectId: number): Promise<Invitation[]> {
      return (await invitationsRepo(db).listPending(projectId, deps.now())).map(toPublic);
    },

    async create(projectId: number, input: { email: string; role: ProjectRole }, actorId: number): Promise<Invitation> {
      const { token, hash } = newToken();
      const now = deps.now();
      const expiresAt = new Date(now.getTime() + config.invitationTtlMs);
      const { invitation, projectName } = await db.transaction(async (trx) => {
        const project = await projectsRepo(trx).findById(projectId);
        if (!project) throw notFound('The project');
        const existing = await usersRepo(trx).findByEmail(input.email);
        if (existing && (await membershipsRepo(trx).roleOf(projectId, existing.id))) {
          throw conflict(`${input.email} is already a member of this project.`);
        }
        // a fresh invitation replaces an open one to the same address: only the newest link works
        const superseded = await invitationsRepo(trx).revokePendingForEmail(projectId, input.email, now);
        const id = await invitationsRepo(trx).insert({ projectId, email: input.email, role: input.role, tokenHash: hash, invitedBy: actorId, expiresAt });
        await recordAudit(trx, {
          projectId,
          actorId,
          action: 'invitation.create',
          detail: { invitationId: id, email: input.email, role: input.role, supersededOpenInvitations: superseded },
        });
        const rec = await invitationsRepo(trx).findById(id);
        if (!rec) throw new Error('invitation vanished inside its own transaction');
        return { invitation: rec, projectName: project.name };
      });
      const link = `${config.publicUrl}/invite/${token}`;
      const mailDelivered = await deps.mailer.send({
        to: input.email,
        ...invitationMail({ link, projectName, inviterName: invitation.invitedBy, role: input.role, expiresAt }),
      });
      return { ...toPublic(invitation), mailDelivered };
    },

    async revoke(projectId: number, invitationId: number, actorId: number): Promise<void> {
      await db.transaction(async (trx) => {
        const now = deps.now();
        const inv = await invitationsRepo(trx).findPending(projectId, invitationId, now);
        if (!inv || !(await invitationsRepo(trx).revoke(invitationId, now))) throw notFound('The invitation');
        await recordAudit(trx, { projectId, actorId, action: 'invitation.revoke', detail: { invitationId, email: inv.email, role: inv.role } });
      });
    },

    async preview(token: string): Promise<{ projectName: string; role: ProjectRole; email: string; invitedBy: string }> {
      const inv = await invitationsRepo(db).findByTokenHash(hashToken(token), deps.now());
      if (!inv || !inv.usable || !(await inviterMayStillInvite(db, inv))) throw notFoundLink();
      return { projectName: inv.projectName, role: inv.role, email: inv.email, invitedBy: inv.invitedBy };
    },

    async accept(token: string, user: { id: number; email: string }): Promise<Project> {
      const projectId = await db.transaction(async (trx) => {
        const now = deps.now();
        const inv = await invitationsRepo(trx).findByTokenHash(hashToken(token), now, { lock: true });
        if (!inv || !inv.usable || !(await inviterMayStillInvite(trx, inv))) throw notFoundLink();
        if (inv.email.toLowerCase() !== user.email.toLowerCase()) {
          throw forbidden(`This invitation was sent to ${inv.email}. Sign in with that address to accept it.`);
        }
        if (!(await membershipsRepo(trx).insert(inv.projectId, user.id, inv.role))) {
          throw conflict('You are already a member of this project.');
        }
        await invitationsRepo(trx).markAccepted(inv.id, user.id, now);
        await recordAudit(trx, {
          projectId: inv.projectId,
          actorId: user.id,
          action: 'invitation.accept',
          detail: { invitationId: inv.id, email: inv.email, role: inv.role },
        });
        return inv.projectId;
      });
      const p = await projectsRepo(db).findForUser(projectId, user.id);
      if (!p) throw notFound('The project');
      return toPublicProject(p);
    },
  };
}

const notFoundLink = () => new AppError('not_found', LINK_INVALID);

/**
 * An invitation carries the inviter's authority, so it is only as good as the inviter's role today: an owner who
 * invited someone as owner and was then demoted, removed or deleted no longer vouches for it (issue 8, item 6).
 * Checked at preview and acceptance rather than revoking on every role change, so no path that changes roles
 * (the API, a script, a future feature) can forget it.
 */
async function inviterMayStillInvite(db: Db, inv: InvitationByToken): Promise<boolean> {
  if (inv.inviterId == null) return false;
  return can(await membershipsRepo(db).roleOf(inv.projectId, inv.inviterId), 'members.invite');
}
export type InvitationService = ReturnType<typeof invitationService>;
