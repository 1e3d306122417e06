import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO, DEMO_GROUP_NAME, makeTestApp, SECOND_GROUP_NAME, type Agent, type TestApp } from '../helpers/testApp';

let t: TestApp;
let g1: number; // Lindqvist Lab: ada owner (site admin), bo owner, cyd editor, dee viewer
let g2: number; // Kessler Group: bo owner, cyd editor
let as: Record<'admin' | 'owner' | 'editor' | 'viewer', Agent>;

async function userId(email: string): Promise<number> {
  return ((await t.db('users').where({ email }).first('id')) as { id: number }).id;
}
async function roleIn(groupId: number, email: string): Promise<string | undefined> {
  const id = await userId(email);
  return ((await t.db('memberships').where({ group_id: groupId, user_id: id }).first('role')) as { role: string } | undefined)?.role;
}
async function lastAudit(): Promise<{ action: string; target: string; details: Record<string, unknown> }> {
  const r = (await t.db('audit_log').orderBy('id', 'desc').first()) as { action: string; target: string; details: string };
  return { ...r, details: JSON.parse(r.details) as Record<string, unknown> };
}

beforeEach(async () => {
  t = await makeTestApp();
  g1 = await t.demoGroupId();
  g2 = await t.secondGroupId();
  as = {
    admin: await t.as(DEMO.admin.email),
    owner: await t.as(DEMO.owner.email),
    editor: await t.as(DEMO.editor.email),
    viewer: await t.as(DEMO.viewer.email),
  };
});
afterEach(async () => {
  await t.close();
});

describe('GET /api/groups', () => {
  it("lists the caller's groups with their role in each", async () => {
    const bo = await as.owner.get('/api/groups');
    expect(bo.status).toBe(200);
    expect(bo.body.groups).toEqual(
      expect.arrayContaining([
        { id: g1, name: DEMO_GROUP_NAME, role: 'owner' },
        { id: g2, name: SECOND_GROUP_NAME, role: 'owner' },
      ]),
    );
    const dee = await as.viewer.get('/api/groups');
    expect(dee.body.groups).toEqual([{ id: g1, name: DEMO_GROUP_NAME, role: 'viewer' }]);
    const cyd = await as.editor.get('/api/groups');
    expect(cyd.body.groups.map((g: { role: string }) => g.role)).toEqual(['editor', 'editor']);
  });

  it('401 signed out', async () => {
    expect((await request(t.app).get('/api/groups')).status).toBe(401);
  });
});

describe('POST /api/groups', () => {
  it('any member creates a group and becomes its owner (audited)', async () => {
    const res = await as.viewer.post('/api/groups').send({ name: '  Dee Reading Circle ' });
    expect(res.status).toBe(201);
    expect(res.body.group).toMatchObject({ name: 'Dee Reading Circle', role: 'owner' });
    const list = await as.viewer.get('/api/groups');
    expect(list.body.groups).toContainEqual({ id: res.body.group.id, name: 'Dee Reading Circle', role: 'owner' });
    expect(await lastAudit()).toMatchObject({ action: 'group.create', target: `group:${res.body.group.id}` });
  });

  it('400 naming the field for an empty or missing name', async () => {
    for (const body of [{}, { name: '   ' }, { name: 42 }, { name: 'x'.repeat(201) }]) {
      const res = await as.viewer.post('/api/groups').send(body);
      expect(res.status).toBe(400);
      expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'name' });
    }
  });

  it('401 signed out', async () => {
    expect((await t.anon().post('/api/groups').send({ name: 'X' })).status).toBe(401);
  });
});

describe('GET /api/groups/:groupId and /members', () => {
  it('shows members and roles to a member', async () => {
    const res = await as.viewer.get(`/api/groups/${g1}`);
    expect(res.status).toBe(200);
    expect(res.body.group).toMatchObject({ id: g1, name: DEMO_GROUP_NAME, role: 'viewer' });
    const members = res.body.group.members as { email: string; role: string }[];
    expect(members.map((m) => [m.email, m.role])).toEqual(
      expect.arrayContaining([
        [DEMO.admin.email, 'owner'],
        [DEMO.owner.email, 'owner'],
        [DEMO.editor.email, 'editor'],
        [DEMO.viewer.email, 'viewer'],
      ]),
    );
    expect(members).toHaveLength(4);
    expect(JSON.stringify(res.body)).not.toContain('password');
    const list = await as.viewer.get(`/api/groups/${g1}/members`);
    expect(list.status).toBe(200);
    expect(list.body.members).toHaveLength(4);
  });

  it('403 for a non-member, admin sees any group as owner, 404 for no group, 400 for a bad id', async () => {
    expect((await as.viewer.get(`/api/groups/${g2}`)).status).toBe(403);
    expect((await as.viewer.get(`/api/groups/${g2}/members`)).status).toBe(403);
    const admin = await as.admin.get(`/api/groups/${g2}`);
    expect(admin.status).toBe(200);
    expect(admin.body.group.role).toBe('owner');
    const missing = await as.admin.get('/api/groups/9999');
    expect(missing.status).toBe(404);
    const bad = await as.admin.get('/api/groups/abc');
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('groupId');
  });

  it('401 signed out', async () => {
    expect((await request(t.app).get(`/api/groups/${g1}`)).status).toBe(401);
    expect((await request(t.app).get(`/api/groups/${g1}/members`)).status).toBe(401);
  });
});

describe('POST /api/groups/:groupId/invitations', () => {
  it('an owner invites an address with a role: 201, stored hashed, mailed, audited', async () => {
    const res = await as.owner.post(`/api/groups/${g1}/invitations`).send({ email: 'New.Person@Example.org', role: 'editor' });
    expect(res.status).toBe(201);
    expect(res.body.invitation).toMatchObject({ email: 'new.person@example.org', groupId: g1, groupRole: 'editor', siteRole: 'member' });
    const row = (await t.db('invitations').where({ id: res.body.invitation.id }).first()) as { token_hash: string };
    expect(row.token_hash).toMatch(/^[0-9a-f]{64}$/);
    const mail = await t.mailCatcher.waitFor((m) => m.to.includes('new.person@example.org'));
    expect(mail.text).toContain(DEMO_GROUP_NAME);
    expect(await lastAudit()).toMatchObject({ action: 'invitation.create', target: `group:${g1}` });
  });

  it('a site admin may invite too', async () => {
    const res = await as.admin.post(`/api/groups/${g2}/invitations`).send({ email: 'someone@example.org', role: 'viewer' });
    expect(res.status).toBe(201);
  });

  it('403 for editor and viewer, 401 signed out', async () => {
    expect((await as.editor.post(`/api/groups/${g1}/invitations`).send({ email: 'a@example.org', role: 'viewer' })).status).toBe(403);
    expect((await as.viewer.post(`/api/groups/${g1}/invitations`).send({ email: 'a@example.org', role: 'viewer' })).status).toBe(403);
    expect((await t.anon().post(`/api/groups/${g1}/invitations`).send({ email: 'a@example.org', role: 'viewer' })).status).toBe(401);
  });

  it('400 naming the field; 409 for someone already in the group', async () => {
    const badRole = await as.owner.post(`/api/groups/${g1}/invitations`).send({ email: 'a@example.org', role: 'admin' });
    expect(badRole.status).toBe(400);
    expect(badRole.body.error.field).toBe('role');
    const badEmail = await as.owner.post(`/api/groups/${g1}/invitations`).send({ email: 'a@', role: 'viewer' });
    expect(badEmail.status).toBe(400);
    expect(badEmail.body.error.field).toBe('email');
    const member = await as.owner.post(`/api/groups/${g1}/invitations`).send({ email: DEMO.viewer.email, role: 'editor' });
    expect(member.status).toBe(409);
    expect(member.body.error.field).toBe('email');
  });
});

describe('PATCH /api/groups/:groupId/members/:userId', () => {
  it('an owner changes a role (audited)', async () => {
    const dee = await userId(DEMO.viewer.email);
    const res = await as.owner.patch(`/api/groups/${g1}/members/${dee}`).send({ role: 'editor' });
    expect(res.status).toBe(200);
    expect(res.body.member).toMatchObject({ userId: dee, role: 'editor' });
    expect(await roleIn(g1, DEMO.viewer.email)).toBe('editor');
    expect(await lastAudit()).toMatchObject({ action: 'group.member.role', details: { userId: dee, from: 'viewer', to: 'editor' } });
  });

  it('refuses to demote the last owner', async () => {
    const bo = await userId(DEMO.owner.email);
    const res = await as.owner.patch(`/api/groups/${g2}/members/${bo}`).send({ role: 'editor' });
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('last_owner');
    expect(await roleIn(g2, DEMO.owner.email)).toBe('owner');
  });

  it('an owner may demote themselves while another owner remains', async () => {
    const bo = await userId(DEMO.owner.email);
    const res = await as.owner.patch(`/api/groups/${g1}/members/${bo}`).send({ role: 'viewer' });
    expect(res.status).toBe(200);
    expect(await roleIn(g1, DEMO.owner.email)).toBe('viewer');
  });

  it('400 bad role / bad id, 404 non-member, 403 editor, 401 signed out', async () => {
    const dee = await userId(DEMO.viewer.email);
    const bad = await as.owner.patch(`/api/groups/${g1}/members/${dee}`).send({ role: 'boss' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('role');
    const badId = await as.owner.patch(`/api/groups/${g1}/members/x`).send({ role: 'viewer' });
    expect(badId.status).toBe(400);
    expect(badId.body.error.field).toBe('userId');
    const notMember = await as.owner.patch(`/api/groups/${g2}/members/${dee}`).send({ role: 'viewer' });
    expect(notMember.status).toBe(404);
    expect((await as.editor.patch(`/api/groups/${g1}/members/${dee}`).send({ role: 'editor' })).status).toBe(403);
    expect((await t.anon().patch(`/api/groups/${g1}/members/${dee}`).send({ role: 'editor' })).status).toBe(401);
    expect(await roleIn(g1, DEMO.viewer.email)).toBe('viewer');
  });
});

describe('DELETE /api/groups/:groupId/members/:userId', () => {
  it('an owner removes a member (audited); the member loses access', async () => {
    const dee = await userId(DEMO.viewer.email);
    const res = await as.owner.delete(`/api/groups/${g1}/members/${dee}`);
    expect(res.status).toBe(204);
    expect(await roleIn(g1, DEMO.viewer.email)).toBeUndefined();
    expect((await as.viewer.get(`/api/groups/${g1}`)).status).toBe(403);
    expect(await lastAudit()).toMatchObject({ action: 'group.member.remove', details: { userId: dee, role: 'viewer' } });
  });

  it('a member may leave; an editor may not remove others', async () => {
    const dee = await userId(DEMO.viewer.email);
    expect((await as.editor.delete(`/api/groups/${g1}/members/${dee}`)).status).toBe(403);
    expect(await roleIn(g1, DEMO.viewer.email)).toBe('viewer');
    expect((await as.viewer.delete(`/api/groups/${g1}/members/${dee}`)).status).toBe(204);
    expect(await lastAudit()).toMatchObject({ action: 'group.member.leave' });
  });

  it('the last owner cannot be removed', async () => {
    const bo = await userId(DEMO.owner.email);
    const res = await as.owner.delete(`/api/groups/${g2}/members/${bo}`);
    expect(res.status).toBe(409);
    expect(res.body.error.code).toBe('last_owner');
    expect(await roleIn(g2, DEMO.owner.email)).toBe('owner');
  });

  it('404 non-member, 401 signed out', async () => {
    const dee = await userId(DEMO.viewer.email);
    expect((await as.owner.delete(`/api/groups/${g2}/members/${dee}`)).status).toBe(404);
    expect((await t.anon().delete(`/api/groups/${g1}/members/${dee}`)).status).toBe(401);
  });
});

describe('POST /api/groups/:groupId/transfer', () => {
  it('the owner hands ownership to a member and becomes editor (audited)', async () => {
    const cyd = await userId(DEMO.editor.email);
    const res = await as.owner.post(`/api/groups/${g2}/transfer`).send({ userId: cyd });
    expect(res.status).toBe(200);
    expect(await roleIn(g2, DEMO.editor.email)).toBe('owner');
    expect(await roleIn(g2, DEMO.owner.email)).toBe('editor');
    expect(await lastAudit()).toMatchObject({ action: 'group.transfer', target: `group:${g2}` });
    // The old owner can no longer manage the group.
    expect((await as.owner.post(`/api/groups/${g2}/transfer`).send({ userId: cyd })).status).toBe(403);
  });

  it('400 bad userId / self, 404 non-member, 403 editor, 401 signed out', async () => {
    const bo = await userId(DEMO.owner.email);
    const dee = await userId(DEMO.viewer.email);
    const cyd = await userId(DEMO.editor.email);
    const bad = await as.owner.post(`/api/groups/${g2}/transfer`).send({ userId: 'cyd' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('userId');
    const self = await as.owner.post(`/api/groups/${g2}/transfer`).send({ userId: bo });
    expect(self.status).toBe(400);
    expect((await as.owner.post(`/api/groups/${g2}/transfer`).send({ userId: dee })).status).toBe(404);
    expect((await as.editor.post(`/api/groups/${g2}/transfer`).send({ userId: cyd })).status).toBe(403);
    expect((await t.anon().post(`/api/groups/${g2}/transfer`).send({ userId: cyd })).status).toBe(401);
    expect(await roleIn(g2, DEMO.owner.email)).toBe('owner');
  });
});
