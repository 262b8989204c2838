/**
 * Optimistic concurrency (a `version` per editable row; a write naming an old version is
 * refused with 409 stale_write and changes nothing) and the rule that a project always
 * keeps at least one owner.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { designListSchema, designResponseSchema, errorBodySchema } from '@contracts/api';
import { addMember, newUser, startTestEnv, type TestEnv } from './helpers';
import { emptyDesign } from '../../server/services/designs';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

async function projectWithEditor() {
  const owner = await newUser(env, 'cc-owner');
  const editor = await newUser(env, 'cc-editor');
  const created = await owner.client.post('/api/projects', { name: 'Concurrency', description: 'first' });
  const projectId = created.body.id as number;
  await addMember(env.knex, projectId, editor.user.id, 'editor');
  return { owner, editor, projectId };
}

describe('stale writes', () => {
  it('project: the second writer of version 1 gets 409 and the first write stands', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    const a = await owner.client.patch(`/api/projects/${projectId}`, { name: 'Owner wins', version: 1 });
    expect(a.status).toBe(200);
    expect(a.body.version).toBe(2);
    const b = await editor.client.patch(`/api/projects/${projectId}`, { name: 'Editor too late', version: 1 });
    expect(b.status).toBe(409);
    expect(b.body.error.code).toBe('stale_write');
    const now = await owner.client.get(`/api/projects/${projectId}`);
    expect(now.body).toMatchObject({ name: 'Owner wins', version: 2 });
  });

  it('design: PUT with an old version is refused with who saved last; with the current one it saves and audits', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    const [first] = designListSchema.parse((await editor.client.get(`/api/projects/${projectId}/designs`)).body).designs;
    const url = `/api/projects/${projectId}/designs/${first.id}`;
    const current = designResponseSchema.parse((await editor.client.get(url)).body).design;
    const mine = { ...emptyDesign('Editor draft'), sites: [{ id: 'D1', species: 'As', position: [0, 0, 0], electrons: 1 }] };
    const ok = await editor.client.put(url, { document: mine, version: current.version });
    expect(ok.status).toBe(200);
    expect(ok.body.design.version).toBe(current.version + 1);
    const stale = await owner.client.put(url, { document: emptyDesign('Owner draft'), version: current.version });
    expect(stale.status).toBe(409);
    const err = errorBodySchema.parse(stale.body).error;
    expect(err.code).toBe('stale_write');
    // the 409 names the version that is current now, who saved it and when
    expect(err.current).toEqual({ version: current.version + 1, updatedAt: ok.body.design.updatedAt, updatedBy: editor.user.displayName });
    const after = designResponseSchema.parse((await owner.client.get(url)).body).design;
    expect(after.name).toBe('Editor draft');
    expect(after.document.sites).toHaveLength(1);
    const audit = await env.knex('audit_events').where({ project_id: projectId, action: 'design.update' }).select('detail');
    expect(audit).toHaveLength(1);
    expect(audit[0].detail).toMatchObject({ designId: first.id, sites: 1, version: current.version + 1 });
    // the refused save left no version behind
    expect(await env.knex('design_versions').where({ design_id: first.id }).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '2' }]);
  });

  it('design: two saves of one version at the same moment: one 200, one 409', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    const [first] = (await owner.client.get(`/api/projects/${projectId}/designs`)).body.designs;
    const url = `/api/projects/${projectId}/designs/${first.id}`;
    const [a, b] = await Promise.all([
      owner.client.put(url, { document: emptyDesign('Owner'), version: 1 }),
      editor.client.put(url, { document: emptyDesign('Editor'), version: 1 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const versions = await env.knex('design_versions').where({ design_id: first.id }).orderBy('version').pluck('version');
    expect(versions).toEqual([1, 2]);
  });

  it('account: renaming with an old version is refused', async () => {
    const u = await newUser(env, 'cc-acct');
    const ok = await u.client.patch('/api/account', { displayName: 'New name', version: u.user.version });
    expect(ok.status).toBe(200);
    expect(ok.body.user.version).toBe(u.user.version + 1);
    const stale = await u.client.patch('/api/account', { displayName: 'Other tab', version: u.user.version });
    expect(stale.status).toBe(409);
    expect((await u.client.get('/api/auth/me')).body.user.displayName).toBe('New name');
  });

  it('member role: a change naming an old version is refused', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    const ok = await owner.client.patch(`/api/projects/${projectId}/members/${editor.user.id}`, { role: 'viewer', version: 1 });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ role: 'viewer', version: 2 });
    const stale = await owner.client.patch(`/api/projects/${projectId}/members/${editor.user.id}`, { role: 'owner', version: 1 });
    expect(stale.status).toBe(409);
    expect(await env.knex('memberships').where({ project_id: projectId, user_id: editor.user.id }).first('role')).toEqual({ role: 'viewer' });
  });
});

describe('the last owner', () => {
  it('cannot be demoted or leave; with a second owner both work', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    const demote = await owner.client.patch(`/api/projects/${projectId}/members/${owner.user.id}`, { role: 'editor', version: 1 });
    expect(demote.status).toBe(409);
    expect(demote.body.error.code).toBe('conflict');
    expect((await owner.client.delete(`/api/projects/${projectId}/members/${owner.user.id}`)).status).toBe(409);

    const promote = await owner.client.patch(`/api/projects/${projectId}/members/${editor.user.id}`, { role: 'owner', version: 1 });
    expect(promote.status).toBe(200);
    expect((await owner.client.patch(`/api/projects/${projectId}/members/${owner.user.id}`, { role: 'viewer', version: 1 })).status).toBe(200);
    // now the former editor is the only owner and cannot leave
    expect((await editor.client.delete(`/api/projects/${projectId}/members/${editor.user.id}`)).status).toBe(409);
    // the demoted first owner (now a viewer) may leave on their own
    expect((await owner.client.delete(`/api/projects/${projectId}/members/${owner.user.id}`)).status).toBe(204);
    expect((await owner.client.get(`/api/projects/${projectId}`)).status).toBe(404);

    const actions = await env.knex('audit_events').where({ project_id: projectId }).orderBy('id').pluck('action');
    expect(actions).toEqual(['project.create', 'member.role_change', 'member.role_change', 'member.leave']);
  });

  it('two owners demoting each other at the same moment leave one owner', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    await owner.client.patch(`/api/projects/${projectId}/members/${editor.user.id}`, { role: 'owner', version: 1 });
    const [a, b] = await Promise.all([
      owner.client.patch(`/api/projects/${projectId}/members/${owner.user.id}`, { role: 'viewer', version: 1 }),
      editor.client.patch(`/api/projects/${projectId}/members/${editor.user.id}`, { role: 'viewer', version: 2 }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const owners = await env.knex('memberships').where({ project_id: projectId, role: 'owner' });
    expect(owners).toHaveLength(1);
  });

  it('an owner removes a member; the removal is audited', async () => {
    const { owner, editor, projectId } = await projectWithEditor();
    expect((await owner.client.delete(`/api/projects/${projectId}/members/${editor.user.id}`)).status).toBe(204);
    expect((await editor.client.get(`/api/projects/${projectId}`)).status).toBe(404);
    const row = await env.knex('audit_events').where({ project_id: projectId, action: 'member.remove' }).first();
    expect(row.detail).toMatchObject({ userId: editor.user.id, role: 'editor' });
  });

  it('a non-member sees 404 for the project, not 403', async () => {
    const { projectId } = await projectWithEditor();
    const outsider = await newUser(env, 'cc-out');
    expect((await outsider.client.get(`/api/projects/${projectId}`)).status).toBe(404);
    expect((await outsider.client.patch(`/api/projects/${projectId}`, { name: 'x', version: 1 })).status).toBe(404);
  });
});
