/**
 * The audit trail: who did what to which project. Services write entries in the same
 * transaction as the change they describe, so an entry exists exactly when the change does.
 */
import type { Db } from '../repositories/db';
import { auditRepo, type AuditInput, type AuditRecord } from '../repositories/audit';

export const AUDIT_ACTIONS = [
  'auth.sign_up',
  /** someone signed up with the address of a confirmed account (actor unknown; detail.userId is the account) */
  'auth.sign_up_existing',
  'auth.email_verify',
  'auth.sign_in',
  'account.password_change',
  'account.password_reset',
  'project.create',
  'project.update',
  'project.delete',
  'invitation.create',
  'invitation.revoke',
  'invitation.accept',
  'member.role_change',
  'member.remove',
  'member.leave',
  'design.create',
  /** a save: detail.version is the new design version */
  'design.update',
  /** a save that changed the name (written beside its design.update) */
  'design.rename',
  'design.delete',
  /** a job was asked for: detail.jobId, kind, designId, designVersion, options; reused: true when an existing revision answered */
  'job.start',
  'job.cancel',
  /** a worker stored the result of a job: detail.revisionId, jobId, kind, storedBytes */
  'revision.create',
  /** a revision file was downloaded: detail.revisionId, file */
  'revision.download',
] as const;
export type AuditAction = (typeof AUDIT_ACTIONS)[number];

export function recordAudit(db: Db, entry: AuditInput & { action: AuditAction }): Promise<void> {
  return auditRepo(db).insert(entry);
}

export function auditService(deps: { db: Db }) {
  return {
    list(projectId: number, limit: number, before?: number): Promise<AuditRecord[]> {
      return auditRepo(deps.db).listForProject(projectId, limit, before);
    },
  };
}
