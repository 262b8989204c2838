/**
 * Every API route × {signed out, viewer, editor, owner}: the status code each gets.
 *
 * Expectations are computed from the role table (server/contracts/roles.ts, `can`): a route
 * that needs a capability answers its success code when the role has it, 403 when it does
 * not, 401 when signed out. The capability each route needs is written down here, on the
 * test side, so a server that checked the wrong capability would fail. A last test proves
 * this table lists every route the server registers.
 *
 * Each case builds its own project (owner, editor, viewer and a spare "target" member plus
 * an open invitation) so destructive routes do not disturb other cases.
 */
import { randomBytes } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { can, type Capability, type ProjectRole } from '@contracts/roles';
import {
  accountNotificationsSchema,
  apiTokenCreatedSchema,
  apiTokenListSchema,
  auditListSchema,
  capturedMailListSchema,
  csrfResponseSchema,
  healthSchema,
  invitationAcceptResponseSchema,
  invitationListSchema,
  invitationPreviewSchema,
  invitationSchema,
  memberListSchema,
  memberSchema,
  meResponseSchema,
  okResponseSchema,
  designListSchema,
  designResponseSchema,
  designVersionListSchema,
  designVersionResponseSchema,
  designImportResponseSchema,
  jobListSchema,
  jobResponseSchema,
  revisionListSchema,
  revisionResponseSchema,
  projectListSchema,
  projectSchema,
  signUpResponseSchema,
  type User,
} from '@contracts/api';
import type { z } from 'zod';
import {
  addMember,
  lastMailId,
  linkToken,
  newUser,
  startTestEnv,
  TEST_PASSWORD,
  uniqueEmail,
  VERIFY_SUBJECT,
  waitForMail,
  type TestClient,
  type TestEnv,
} from './helpers';
import { emptyDesign } from '../../server/services/designs';
import { jobsRepo } from '../../server/repositories/jobs';
import { revisionsRepo } from '../../server/repositories/revisions';
import { packFile } from '../../server/jobs/storage';
import { apiTokensRepo } from '../../server/repositories/apiTokens';

type Who = 'signed out' | ProjectRole;
const WHO: Who[] = ['signed out', 'viewer', 'editor', 'owner'];

/** who may call: anyone, any signed-in user, a project capability, or a site capability */
type Rule = { kind: 'public' } | { kind: 'user' } | { kind: 'project'; capability: Capability } | { kind: 'site-admin' };

interface Fixture {
  projectId: number;
  /** the project's starting design (version 1) */
  designId: number;
  users: Record<ProjectRole | 'target' | 'host', { user: User; email: string }>;
  invitationId: number;
  /** an open invitation to the acting user's own address, into a project they are not in */
  ownInviteToken: string | null;
  /** a fresh password-reset token for a throwaway account */
  resetToken: string;
  /** a fresh sign-up confirmation token for a throwaway (unconfirmed) account */
  verifyToken: string;
  /** a queued job of the starting design (not in pg-boss: nothing runs it) */
  jobId: number;
  /** a succeeded job and its revision (with a results.json) */
  doneJobId: number;
  revisionId: number;
  /** a personal API token of the acting user (1 when signed out) */
  apiTokenId: number;
}

interface RouteCase {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  rule: Rule;
  success: number;
  url(f: Fixture): string;
  body?(f: Fixture, c: TestClient): unknown | Promise<unknown>;
  /** send this file as multipart/form-data field `file` instead of a JSON body */
  file?: { name: string; content: string };
  /** extra set-up the case needs (kept out of the other cases) */
  needs?: { ownInvite?: boolean; reset?: boolean; openInvitation?: boolean; verify?: boolean; apiToken?: boolean };
  /** the contract the success body must match (server/contracts/api.ts) */
  schema?: z.ZodType;
  /** undo after the call so the shared role users stay usable */
  after?(c: TestClient, f: Fixture): Promise<void>;
}

const p = (f: Fixture) => `/api/projects/${f.projectId}`;
const d = (f: Fixture) => `/api/projects/${f.projectId}/designs/${f.designId}`;

const ROUTES: RouteCase[] = [
  { method: 'get', path: '/health', rule: { kind: 'public' }, success: 200, url: () => '/api/health', schema: healthSchema },
  { method: 'get', path: '/auth/csrf', rule: { kind: 'public' }, success: 200, url: () => '/api/auth/csrf', schema: csrfResponseSchema },
  {
    method: 'post',
    path: '/auth/sign-up',
    rule: { kind: 'public' },
    success: 202,
    url: () => '/api/auth/sign-up',
    schema: signUpResponseSchema,
    body: () => ({ email: uniqueEmail('matrix-su'), password: TEST_PASSWORD, displayName: 'Matrix' }),
  },
  {
    method: 'post',
    path: '/auth/verify',
    rule: { kind: 'public' },
    success: 200,
    url: () => '/api/auth/verify',
    schema: meResponseSchema,
    needs: { verify: true },
    body: (f) => ({ token: f.verifyToken }),
  },
  {
    method: 'post',
    path: '/auth/sign-in',
    rule: { kind: 'public' },
    success: 200,
    url: () => '/api/auth/sign-in',
    schema: meResponseSchema,
    body: (f) => ({ email: f.users.viewer.email, password: TEST_PASSWORD }),
  },
  { method: 'post', path: '/auth/sign-out', rule: { kind: 'public' }, success: 204, url: () => '/api/auth/sign-out' },
  { method: 'get', path: '/auth/me', rule: { kind: 'user' }, success: 200, url: () => '/api/auth/me', schema: meResponseSchema },
  {
    method: 'post',
    path: '/auth/password-reset/request',
    rule: { kind: 'public' },
    success: 202,
    url: () => '/api/auth/password-reset/request',
    schema: okResponseSchema,
    body: () => ({ email: uniqueEmail('matrix-nobody') }),
  },
  {
    method: 'post',
    path: '/auth/password-reset/confirm',
    rule: { kind: 'public' },
    success: 200,
    url: () => '/api/auth/password-reset/confirm',
    schema: okResponseSchema,
    needs: { reset: true },
    body: (f) => ({ token: f.resetToken, password: 'a-brand-new-passphrase' }),
  },
  {
    method: 'patch',
    path: '/account',
    rule: { kind: 'user' },
    success: 200,
    url: () => '/api/account',
    schema: meResponseSchema,
    body: async (_f, c) => {
      const me = await c.get('/api/auth/me');
      return { displayName: 'Renamed in matrix', version: me.status === 200 ? me.body.user.version : 1 };
    },
  },
  {
    method: 'post',
    path: '/account/password',
    rule: { kind: 'user' },
    success: 200,
    url: () => '/api/account/password',
    schema: okResponseSchema,
    body: () => ({ currentPassword: TEST_PASSWORD, newPassword: 'temporary-passphrase-1' }),
    after: async (c) => {
      if (c.user) await c.post('/api/account/password', { currentPassword: 'temporary-passphrase-1', newPassword: TEST_PASSWORD });
    },
  },
  { method: 'get', path: '/account/notifications', rule: { kind: 'user' }, success: 200, url: () => '/api/account/notifications', schema: accountNotificationsSchema },
  {
    method: 'put',
    path: '/account/notifications',
    rule: { kind: 'user' },
    success: 200,
    url: () => '/api/account/notifications',
    schema: accountNotificationsSchema,
    body: () => ({ jobMail: true }),
  },
  { method: 'get', path: '/account/tokens', rule: { kind: 'user' }, success: 200, url: () => '/api/account/tokens', schema: apiTokenListSchema },
  {
    method: 'post',
    path: '/account/tokens',
    rule: { kind: 'user' },
    success: 201,
    url: () => '/api/account/tokens',
    schema: apiTokenCreatedSchema,
    body: () => ({ name: 'Matrix token' }),
  },
  {
    method: 'delete',
    path: '/account/tokens/:tokenId',
    rule: { kind: 'user' },
    success: 204,
    url: (f) => `/api/account/tokens/${f.apiTokenId}`,
    needs: { apiToken: true },
  },
  { method: 'get', path: '/projects', rule: { kind: 'user' }, success: 200, url: () => '/api/projects', schema: projectListSchema },
  { method: 'post', path: '/projects', rule: { kind: 'user' }, success: 201, url: () => '/api/projects', body: () => ({ name: 'Matrix extra' }), schema: projectSchema },
  { method: 'get', path: '/projects/:projectId', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: p, schema: projectSchema },
  {
    method: 'patch',
    path: '/projects/:projectId',
    rule: { kind: 'project', capability: 'project.rename' },
    success: 200,
    url: p,
    body: () => ({ name: 'Renamed', version: 1 }),
    schema: projectSchema,
  },
  { method: 'delete', path: '/projects/:projectId', rule: { kind: 'project', capability: 'project.delete' }, success: 204, url: p },
  { method: 'get', path: '/projects/:projectId/members', rule: { kind: 'project', capability: 'members.read' }, success: 200, url: (f) => `${p(f)}/members`, schema: memberListSchema },
  {
    method: 'patch',
    path: '/projects/:projectId/members/:userId',
    rule: { kind: 'project', capability: 'members.changeRole' },
    success: 200,
    url: (f) => `${p(f)}/members/${f.users.target.user.id}`,
    body: () => ({ role: 'editor', version: 1 }),
    schema: memberSchema,
  },
  {
    method: 'delete',
    path: '/projects/:projectId/members/:userId',
    rule: { kind: 'project', capability: 'members.remove' },
    success: 204,
    url: (f) => `${p(f)}/members/${f.users.target.user.id}`,
  },
  { method: 'get', path: '/projects/:projectId/invitations', rule: { kind: 'project', capability: 'members.read' }, success: 200, url: (f) => `${p(f)}/invitations`, schema: invitationListSchema },
  {
    method: 'post',
    path: '/projects/:projectId/invitations',
    rule: { kind: 'project', capability: 'members.invite' },
    success: 201,
    url: (f) => `${p(f)}/invitations`,
    body: () => ({ email: uniqueEmail('matrix-inv'), role: 'viewer' }),
    schema: invitationSchema,
  },
  {
    method: 'delete',
    path: '/projects/:projectId/invitations/:invitationId',
    rule: { kind: 'project', capability: 'members.invite' },
    success: 204,
    needs: { openInvitation: true },
    url: (f) => `${p(f)}/invitations/${f.invitationId}`,
  },
  {
    method: 'get',
    path: '/invitations/:token',
    rule: { kind: 'public' },
    success: 200,
    needs: { ownInvite: true },
    url: (f) => `/api/invitations/${f.ownInviteToken}`,
    schema: invitationPreviewSchema,
  },
  {
    method: 'post',
    path: '/invitations/:token/accept',
    rule: { kind: 'user' },
    success: 200,
    needs: { ownInvite: true },
    url: (f) => `/api/invitations/${f.ownInviteToken}/accept`,
    schema: invitationAcceptResponseSchema,
  },
  { method: 'get', path: '/projects/:projectId/designs', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: (f) => `${p(f)}/designs`, schema: designListSchema },
  {
    method: 'post',
    path: '/projects/:projectId/designs',
    rule: { kind: 'project', capability: 'design.edit' },
    success: 201,
    url: (f) => `${p(f)}/designs`,
    body: () => ({ name: 'Matrix second design' }),
    schema: designResponseSchema,
  },
  { method: 'get', path: '/projects/:projectId/designs/:designId', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: d, schema: designResponseSchema },
  {
    method: 'put',
    path: '/projects/:projectId/designs/:designId',
    rule: { kind: 'project', capability: 'design.edit' },
    success: 200,
    url: d,
    body: () => ({ document: emptyDesign('Matrix design'), version: 1 }),
    schema: designResponseSchema,
  },
  { method: 'delete', path: '/projects/:projectId/designs/:designId', rule: { kind: 'project', capability: 'design.edit' }, success: 204, url: d },
  {
    method: 'get',
    path: '/projects/:projectId/designs/:designId/versions',
    rule: { kind: 'project', capability: 'project.read' },
    success: 200,
    url: (f) => `${d(f)}/versions`,
    schema: designVersionListSchema,
  },
  {
    method: 'get',
    path: '/projects/:projectId/designs/:designId/versions/:version',
    rule: { kind: 'project', capability: 'project.read' },
    success: 200,
    url: (f) => `${d(f)}/versions/1`,
    schema: designVersionResponseSchema,
  },
  {
    method: 'post',
    path: '/projects/:projectId/designs/:designId/imports',
    rule: { kind: 'project', capability: 'design.edit' },
    success: 200,
    url: (f) => `${d(f)}/imports`,
    file: { name: 'two.csv', content: 'id,species,x_nm,y_nm,z_nm\na,P,0,0,0\nb,As,1.08620410,1.08620410,0\n' },
    schema: designImportResponseSchema,
  },
  {
    method: 'get',
    path: '/projects/:projectId/designs/:designId/export',
    rule: { kind: 'project', capability: 'project.export' },
    success: 200,
    url: (f) => `${d(f)}/export?format=placement`,
  },
  {
    method: 'post',
    path: '/projects/:projectId/designs/:designId/jobs',
    rule: { kind: 'project', capability: 'mesh.create' },
    success: 202,
    url: (f) => `${d(f)}/jobs`,
    body: () => ({ kind: 'mesh', options: { order: 1 } }),
    schema: jobResponseSchema,
  },
  { method: 'get', path: '/projects/:projectId/jobs', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: (f) => `${p(f)}/jobs`, schema: jobListSchema },
  { method: 'get', path: '/projects/:projectId/jobs/:jobId', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: (f) => `${p(f)}/jobs/${f.jobId}`, schema: jobResponseSchema },
  // a finished job: the stream sends it once and ends
  { method: 'get', path: '/projects/:projectId/jobs/:jobId/events', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: (f) => `${p(f)}/jobs/${f.doneJobId}/events` },
  {
    method: 'post',
    path: '/projects/:projectId/jobs/:jobId/cancel',
    rule: { kind: 'project', capability: 'mesh.create' },
    success: 200,
    url: (f) => `${p(f)}/jobs/${f.jobId}/cancel`,
    schema: jobResponseSchema,
  },
  { method: 'get', path: '/projects/:projectId/revisions', rule: { kind: 'project', capability: 'project.read' }, success: 200, url: (f) => `${p(f)}/revisions`, schema: revisionListSchema },
  {
    method: 'get',
    path: '/projects/:projectId/revisions/:revisionId',
    rule: { kind: 'project', capability: 'project.read' },
    success: 200,
    url: (f) => `${p(f)}/revisions/${f.revisionId}`,
    schema: revisionResponseSchema,
  },
  {
    method: 'get',
    path: '/projects/:projectId/revisions/:revisionId/files/:name',
    rule: { kind: 'project', capability: 'project.read' },
    success: 200,
    url: (f) => `${p(f)}/revisions/${f.revisionId}/files/results.json`,
  },
  { method: 'get', path: '/projects/:projectId/audit', rule: { kind: 'project', capability: 'audit.read' }, success: 200, url: (f) => `${p(f)}/audit`, schema: auditListSchema },
  // the role users are ordinary site members, so the admin route refuses all of them
  { method: 'get', path: '/admin/mail', rule: { kind: 'site-admin' }, success: 200, url: () => '/api/admin/mail', schema: capturedMailListSchema },
];

function expected(route: RouteCase, who: Who): number {
  const r = route.rule;
  if (r.kind === 'public') return route.success;
  if (who === 'signed out') return 401;
  if (r.kind === 'user') return route.success;
  if (r.kind === 'site-admin') return 403; // no role user is a site admin
  return can(who, r.capability) ? route.success : 403;
}

let env: TestEnv;
const roleUsers = {} as Record<ProjectRole | 'target' | 'host', { user: User; email: string }>;

beforeAll(async () => {
  env = await startTestEnv();
  for (const role of ['owner', 'editor', 'viewer', 'target', 'host'] as const) {
    const u = await newUser(env, `matrix-${role}`);
    roleUsers[role] = { user: u.user, email: u.email };
  }
});
afterAll(async () => {
  await env?.stop();
});

async function signedInClient(who: Who): Promise<TestClient> {
  const c = env.client();
  if (who !== 'signed out') await c.signIn(roleUsers[who].email);
  else await c.refreshCsrf();
  return c;
}

async function buildFixture(route: RouteCase, who: Who): Promise<Fixture> {
  const owner = env.client();
  await owner.signIn(roleUsers.owner.email);
  const created = await owner.post('/api/projects', { name: `Matrix ${route.method} ${route.path} ${who}` });
  expect(created.status).toBe(201);
  const projectId = created.body.id as number;
  await addMember(env.knex, projectId, roleUsers.editor.user.id, 'editor');
  await addMember(env.knex, projectId, roleUsers.viewer.user.id, 'viewer');
  await addMember(env.knex, projectId, roleUsers.target.user.id, 'viewer');
  let invitationId = 0;
  if (route.needs?.openInvitation) {
    const inv = await owner.post(`/api/projects/${projectId}/invitations`, { email: uniqueEmail('matrix-open'), role: 'viewer' });
    expect(inv.status).toBe(201);
    invitationId = inv.body.id as number;
  }

  let ownInviteToken: string | null = null;
  if (route.needs?.ownInvite) {
    // a project run by an outsider, inviting the acting user's own address (any address when signed out)
    const host = env.client();
    await host.signIn(roleUsers.host.email);
    const other = await host.post('/api/projects', { name: 'Matrix invite target' });
    const inviteEmail = who === 'signed out' ? uniqueEmail('matrix-anon') : roleUsers[who].email;
    const sent = await host.post(`/api/projects/${other.body.id}/invitations`, { email: inviteEmail, role: 'viewer' });
    expect(sent.status).toBe(201);
    const mail = await waitForMail(env.knex, inviteEmail, /Invitation/);
    ownInviteToken = linkToken(mail.text, env.url, 'invite');
  }

  let resetToken = 'x'.repeat(43);
  if (route.needs?.reset) {
    const throwaway = await newUser(env, 'matrix-reset');
    await env.client().post('/api/auth/password-reset/request', { email: throwaway.email });
    const mail = await waitForMail(env.knex, throwaway.email, /Reset/);
    resetToken = linkToken(mail.text, env.url, 'reset');
  }
  let verifyToken = 'x'.repeat(43);
  if (route.needs?.verify) {
    const email = uniqueEmail('matrix-verify');
    const sinceId = await lastMailId(env.knex);
    expect((await env.client().post('/api/auth/sign-up', { email, password: TEST_PASSWORD, displayName: 'Matrix verify' })).status).toBe(202);
    verifyToken = linkToken((await waitForMail(env.knex, email, VERIFY_SUBJECT, { sinceId })).text, env.mailBase, 'verify');
  }
  const designId = (await env.knex('designs').where({ project_id: projectId }).first('id')).id as number;
  const { sha256 } = (await env.knex('design_versions').where({ design_id: designId, version: 1 }).first('sha256')) as { sha256: string };
  const ownerId = roleUsers.owner.user.id;
  const common = { projectId, designId, designVersion: 1, designSha256: sha256, createdBy: ownerId };
  const revisionId = await revisionsRepo(env.knex).insert({
    ...common,
    jobId: null,
    kind: 'mesh',
    options: { order: 2 },
    optionsKey: '{"order":2}',
    software: { version: 'test', commit: null },
    timings: {},
    summary: { tets: 0 },
    files: [packFile('results.json', new TextEncoder().encode('{"tets":0}\n'))],
  });
  const doneJobId = await jobsRepo(env.knex).insert({ ...common, kind: 'mesh', options: { order: 2 }, state: 'succeeded', progress: { phase: 'done', fraction: 1 }, revisionId, finished: true });
  const jobId = await jobsRepo(env.knex).insert({ ...common, kind: 'coulomb', options: { order: 2, adaptive: false }, state: 'queued', progress: { phase: 'queued', fraction: 0 } });
  let apiTokenId = 1;
  if (route.needs?.apiToken && who !== 'signed out') {
    apiTokenId = (await apiTokensRepo(env.knex).insert({ userId: roleUsers[who].user.id, name: 'Matrix', secretHash: randomBytes(32).toString('hex'), prefix: 'twk_matrix' })).id;
  }
  return { projectId, designId, users: roleUsers, invitationId, ownInviteToken, resetToken, verifyToken, jobId, doneJobId, revisionId, apiTokenId };
}

describe('role-by-route matrix', () => {
  for (const route of ROUTES) {
    for (const who of WHO) {
      const want = expected(route, who);
      it(`${route.method.toUpperCase()} /api${route.path} as ${who} → ${want}`, async () => {
        const f = await buildFixture(route, who);
        const c = await signedInClient(who);
        const body = route.body ? await route.body(f, c) : undefined;
        const r = route.file
          ? await c.agent
              .post(route.url(f))
              .set('x-csrf-token', c.csrf ?? (await c.refreshCsrf()))
              .attach('file', Buffer.from(route.file.content), route.file.name)
          : await c.request(route.method, route.url(f), body);
        expect(r.status, JSON.stringify(r.body)).toBe(want);
        if (want >= 400) expect(r.body.error).toBeDefined();
        if (r.status === route.success && route.schema) route.schema.parse(r.body);
        if (route.after && r.status === route.success) await route.after(c, f);
      });
    }
  }

  it('covers every route the server registers', () => {
    const registered = (env.server.app.locals.apiRoutes as { method: string; path: string }[]).map((r) => `${r.method} ${r.path}`).sort();
    const tested = ROUTES.map((r) => `${r.method.toUpperCase()} ${r.path}`).sort();
    expect(tested).toEqual(registered);
  });
});

describe('site admin', () => {
  it('lets a site admin read captured mail', async () => {
    const admin = await newUser(env, 'matrix-admin');
    await env.knex('users').where({ id: admin.user.id }).update({ site_role: 'admin' });
    const r = await admin.client.get('/api/admin/mail');
    expect(r.status).toBe(200);
    capturedMailListSchema.parse(r.body);
  });
});
