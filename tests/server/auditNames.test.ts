/**
 * The activity list speaks of people by name (issue 8, item 14): an entry about a member (role
 * change, removal) carries that member's current display name as `subject`, read at list time,
 * so a later rename shows and a deleted account falls back to the address in the detail.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditListSchema } from '@contracts/api';
import { addMember, newUser, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.stop();
});

describe('GET /api/projects/:projectId/audit', () => {
  it('names the member an entry concerns, and follows a later change of display name', async () => {
    const owner = await newUser(env, 'an-owner');
    const mate = await newUser(env, 'an-mate');
    const projectId = (await owner.client.post('/api/projects', { name: 'Names in the log' })).body.id as number;
    await addMember(env.knex, projectId, mate.user.id, 'viewer');
    expect((await owner.client.patch(`/api/projects/${projectId}/members/${mate.user.id}`, { role: 'editor', version: 1 })).status).toBe(200);

    const first = auditListSchema.parse((await owner.client.get(`/api/projects/${projectId}/audit`)).body);
    const change = first.entries.find((e) => e.action === 'member.role_change');
    expect(change?.subject).toBe(mate.user.displayName);
    expect(change?.actor).toBe(owner.user.displayName);
    // entries that name no member have no subject
    expect(first.entries.find((e) => e.action === 'project.create')?.subject).toBeNull();

    expect((await mate.client.patch('/api/account', { displayName: 'Renamed Mate', version: mate.user.version })).status).toBe(200);
    const second = auditListSchema.parse((await owner.client.get(`/api/projects/${projectId}/audit`)).body);
    expect(second.entries.find((e) => e.action === 'member.role_change')?.subject).toBe('Renamed Mate');
  });

  it('a malformed userId in a stored detail leaves the subject empty instead of failing the list', async () => {
    const owner = await newUser(env, 'an-odd');
    const projectId = (await owner.client.post('/api/projects', { name: 'Odd detail' })).body.id as number;
    await env.knex('audit_events').insert({ project_id: projectId, actor_id: owner.user.id, action: 'member.remove', detail: JSON.stringify({ userId: 'not-a-number' }) });
    const res = await owner.client.get(`/api/projects/${projectId}/audit`);
    expect(res.status).toBe(200);
    expect(auditListSchema.parse(res.body).entries[0]).toMatchObject({ action: 'member.remove', subject: null });
  });
});
