/**
 * Invitation by e-mail, end to end: an owner invites an address, the fake SMTP server
 * receives the message (read back from captured_mail), the link's token is followed, the
 * invitee signs up with that address and accepts, and a membership with the invited role
 * exists afterwards, with audit entries for each step.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { invitationListSchema, invitationPreviewSchema, memberListSchema } from '@contracts/api';
import { linkToken, newUser, startTestEnv, uniqueEmail, waitForMail, waitForMailCount, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv({ publicUrl: 'https://tetrawell.lab.test/' });
});
afterAll(async () => {
  await env?.stop();
});

async function ownerWithProject(name = 'Invitation trial') {
  const owner = await newUser(env, 'inv-owner');
  const project = await owner.client.post('/api/projects', { name });
  expect(project.status).toBe(201);
  return { owner, projectId: project.body.id as number };
}

describe('invitation by e-mail', () => {
  it('mails a link; following it as the invited address makes a member', async () => {
    const { owner, projectId } = await ownerWithProject('Chain of five');
    const inviteeEmail = uniqueEmail('invitee');

    const created = await owner.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail.toUpperCase(), role: 'editor' });
    expect(created.status).toBe(201);
    expect(created.body.email).toBe(inviteeEmail);
    expect(created.body.mailDelivered).toBe(true);

    const listed = invitationListSchema.parse((await owner.client.get(`/api/projects/${projectId}/invitations`)).body);
    expect(listed.invitations.map((i) => i.email)).toContain(inviteeEmail);

    // the message as the fake SMTP server stored it; links use PUBLIC_URL (trailing slash dropped)
    const mail = await waitForMail(env.knex, inviteeEmail, /Invitation to "Chain of five"/);
    expect(mail.text).toContain('as an editor');
    const token = linkToken(mail.text, 'https://tetrawell.lab.test', 'invite');
    // only a hash is stored: the token itself appears nowhere in the database
    const stored = await env.knex('invitations').where({ id: created.body.id }).first();
    expect(stored.token_hash).not.toContain(token);
    expect(stored.token_hash).toMatch(/^[0-9a-f]{64}$/);

    // preview works signed out (the invitee has no account yet)
    const invitee = env.client();
    const preview = await invitee.get(`/api/invitations/${token}`);
    expect(preview.status).toBe(200);
    expect(invitationPreviewSchema.parse(preview.body)).toMatchObject({ projectName: 'Chain of five', role: 'editor', email: inviteeEmail });

    expect((await invitee.post(`/api/invitations/${token}/accept`)).status).toBe(401);
    await invitee.signUp(inviteeEmail);
    const accepted = await invitee.post(`/api/invitations/${token}/accept`);
    expect(accepted.status).toBe(200);
    expect(accepted.body.project).toMatchObject({ id: projectId, role: 'editor' });

    const members = memberListSchema.parse((await owner.client.get(`/api/projects/${projectId}/members`)).body).members;
    expect(members.find((m) => m.email === inviteeEmail)?.role).toBe('editor');
    // the project now shows in the invitee's list, and the used link is spent
    expect((await invitee.get('/api/projects')).body.projects.map((p: { id: number }) => p.id)).toContain(projectId);
    expect((await invitee.get(`/api/invitations/${token}`)).status).toBe(404);
    expect((await owner.client.get(`/api/projects/${projectId}/invitations`)).body.invitations).toHaveLength(0);

    const actions = await env.knex('audit_events').where({ project_id: projectId }).orderBy('id').pluck('action');
    expect(actions).toEqual(['project.create', 'invitation.create', 'invitation.accept']);
  });

  it('refuses a signed-in user whose address differs (403) and keeps the link usable', async () => {
    const { owner, projectId } = await ownerWithProject();
    const inviteeEmail = uniqueEmail('right');
    await owner.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail, role: 'viewer' });
    const token = linkToken((await waitForMail(env.knex, inviteeEmail, /Invitation/)).text, 'https://tetrawell.lab.test', 'invite');
    const stranger = await newUser(env, 'wrong');
    const r = await stranger.client.post(`/api/invitations/${token}/accept`);
    expect(r.status).toBe(403);
    expect(await env.knex('memberships').where({ project_id: projectId, user_id: stranger.user.id }).first()).toBeUndefined();
    expect((await env.client().get(`/api/invitations/${token}`)).status).toBe(200);
  });

  it('a revoked invitation link no longer works; revoking is audited', async () => {
    const { owner, projectId } = await ownerWithProject();
    const inviteeEmail = uniqueEmail('revoked');
    const created = await owner.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail, role: 'viewer' });
    const token = linkToken((await waitForMail(env.knex, inviteeEmail, /Invitation/)).text, 'https://tetrawell.lab.test', 'invite');
    expect((await owner.client.delete(`/api/projects/${projectId}/invitations/${created.body.id}`)).status).toBe(204);
    expect((await owner.client.delete(`/api/projects/${projectId}/invitations/${created.body.id}`)).status).toBe(404);
    const invitee = env.client();
    await invitee.signUp(inviteeEmail);
    expect((await invitee.post(`/api/invitations/${token}/accept`)).status).toBe(404);
    expect(await env.knex('audit_events').where({ project_id: projectId, action: 'invitation.revoke' }).count<{ n: string }[]>({ n: '*' })).toEqual([{ n: '1' }]);
  });

  it('an expired link no longer works', async () => {
    const { owner, projectId } = await ownerWithProject();
    const inviteeEmail = uniqueEmail('late');
    const created = await owner.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail, role: 'viewer' });
    const token = linkToken((await waitForMail(env.knex, inviteeEmail, /Invitation/)).text, 'https://tetrawell.lab.test', 'invite');
    await env.knex('invitations').where({ id: created.body.id }).update({ expires_at: new Date(Date.now() - 1000) });
    expect((await env.client().get(`/api/invitations/${token}`)).status).toBe(404);
  });

  it('a new invitation to the same address replaces the open one', async () => {
    const { owner, projectId } = await ownerWithProject();
    const inviteeEmail = uniqueEmail('twice');
    await owner.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail, role: 'viewer' });
    const first = linkToken((await waitForMail(env.knex, inviteeEmail, /Invitation/)).text, 'https://tetrawell.lab.test', 'invite');
    await owner.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail, role: 'editor' });
    // the second mail leaves through the queue after the answer
    expect(await waitForMailCount(env.knex, inviteeEmail, 2)).toBe(2);
    const second = linkToken((await waitForMail(env.knex, inviteeEmail, /Invitation/)).text, 'https://tetrawell.lab.test', 'invite');
    expect(second).not.toBe(first);
    expect((await env.client().get(`/api/invitations/${first}`)).status).toBe(404);
    expect((await env.client().get(`/api/invitations/${second}`)).body.role).toBe('editor');
    expect((await owner.client.get(`/api/projects/${projectId}/invitations`)).body.invitations).toHaveLength(1);
  });

  it('refuses to invite someone who is already a member (409)', async () => {
    const { owner, projectId } = await ownerWithProject();
    const r = await owner.client.post(`/api/projects/${projectId}/invitations`, { email: owner.email, role: 'viewer' });
    expect(r.status).toBe(409);
  });
});

// issue 8, item 6: an invitation is only as good as the inviter's role when it is used
describe('invitations outlive no inviter role', () => {
  async function invitedByCoOwner() {
    const { owner, projectId } = await ownerWithProject('Co-owned');
    const co = await newUser(env, 'inv-coowner');
    // set-up: a second owner, added directly (not the behaviour under test)
    await env.knex('memberships').insert({ project_id: projectId, user_id: co.user.id, role: 'owner' });
    const inviteeEmail = uniqueEmail('inv-late');
    const created = await co.client.post(`/api/projects/${projectId}/invitations`, { email: inviteeEmail, role: 'owner' });
    expect(created.status).toBe(201);
    const mail = await waitForMail(env.knex, inviteeEmail, /Invitation to "Co-owned"/);
    const token = linkToken(mail.text, 'https://tetrawell.lab.test', 'invite');
    return { owner, co, projectId, inviteeEmail, token };
  }

  async function coMember(owner: { client: { get(p: string): Promise<{ body: unknown }> } }, projectId: number, userId: number) {
    const members = memberListSchema.parse((await owner.client.get(`/api/projects/${projectId}/members`)).body).members;
    return members.find((m) => m.userId === userId)!;
  }

  it('an owner demoted to viewer: the invitation they sent can no longer be previewed or accepted', async () => {
    const { owner, co, projectId, inviteeEmail, token } = await invitedByCoOwner();
    const m = await coMember(owner, projectId, co.user.id);
    expect((await owner.client.patch(`/api/projects/${projectId}/members/${co.user.id}`, { role: 'viewer', version: m.version })).status).toBe(200);

    const invitee = env.client();
    await invitee.signUp(inviteeEmail);
    expect((await invitee.get(`/api/invitations/${token}`)).status).toBe(404);
    const r = await invitee.post(`/api/invitations/${token}/accept`);
    expect(r.status).toBe(404);
    expect(await env.knex('memberships').where({ project_id: projectId, user_id: invitee.user!.id }).first()).toBeUndefined();
  });

  it('an owner removed from the project: their invitation is dead too', async () => {
    const { owner, co, projectId, inviteeEmail, token } = await invitedByCoOwner();
    expect((await owner.client.delete(`/api/projects/${projectId}/members/${co.user.id}`)).status).toBe(204);
    const invitee = env.client();
    await invitee.signUp(inviteeEmail);
    expect((await invitee.post(`/api/invitations/${token}/accept`)).status).toBe(404);
    expect(await env.knex('memberships').where({ project_id: projectId, user_id: invitee.user!.id }).first()).toBeUndefined();
  });

  it('an inviter who is still an owner: the invitation works (control)', async () => {
    const { projectId, inviteeEmail, token } = await invitedByCoOwner();
    const invitee = env.client();
    await invitee.signUp(inviteeEmail);
    const r = await invitee.post(`/api/invitations/${token}/accept`);
    expect(r.status).toBe(200);
    expect(r.body.project).toMatchObject({ id: projectId, role: 'owner' });
  });
});
