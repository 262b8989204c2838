/**
 * The one role table: which project role may do what.
 * The server's permission checks and the client's show/hide decisions both read it.
 */
import { z } from 'zod';

export const projectRoleSchema = z.enum(['owner', 'editor', 'viewer']);
export type ProjectRole = z.infer<typeof projectRoleSchema>;

export const siteRoleSchema = z.enum(['admin', 'member']);
export type SiteRole = z.infer<typeof siteRoleSchema>;

export const capabilities = [
  'project.read',
  'project.export',
  'project.rename',
  'project.delete',
  'design.edit',
  'mesh.create',
  'members.read',
  'members.invite',
  'members.changeRole',
  'members.remove',
  'audit.read',
] as const;
export type Capability = (typeof capabilities)[number];

export const roleCapabilities: Record<ProjectRole, readonly Capability[]> = {
  owner: capabilities,
  editor: ['project.read', 'project.export', 'project.rename', 'design.edit', 'mesh.create', 'members.read', 'audit.read'],
  viewer: ['project.read', 'project.export', 'members.read'],
};

export function can(role: ProjectRole | null | undefined, capability: Capability): boolean {
  return role != null && roleCapabilities[role].includes(capability);
}

/** Site-wide capabilities, held by site admins only. */
export const siteCapabilities = ['admin.mail.read', 'admin.users.read'] as const;
export type SiteCapability = (typeof siteCapabilities)[number];

export function canSite(role: SiteRole | null | undefined, capability: SiteCapability): boolean {
  return role === 'admin' && siteCapabilities.includes(capability);
}
