import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';

let t: TestApp;
let admin: Agent;
let owner: Agent;

async function userId(email: string): Promise<number> {
  return ((await t.db('users').where({ email }).first('id')) as { id: number }).id;
}

beforeEach(async () => {
  t = await makeTestApp();
  admin = await t.as(DEMO.admin.email);
  owner = await t.as(DEMO.owner.email);
});
afterEach(async () => {
  await t.close();
});

describe('GET /api/admin/users', () => {
  it('lists every user with site role, state and group roles, never a hash', async () => {
    const res = await admin.get('/api/admin/users');
    expect(res.status).toBe(200);
    const users = res.body.users as { email: string; role: string; disabled: boolean; groups: { role: string }[] }[];
    expect(users.map((u) => u.email).sort()).toEqual([DEMO.admin.email, DEMO.owner.email, DEMO.editor.email, DEMO.viewer.email].sort());
    const bo = users.find((u) => u.email === DEMO.owner.email)!;
    expect(bo).toMatchObject({ role: 'member', disabled: false });
    expect(bo.groups.map((g) => g.role)).toEqual(['owner', 'owner']);
    expect(JSON.stringify(res.body)).not.toMatch(/argon2|password/);
  });

  it('403 for a member, 401 signed out', async () => {
    expect((await owner.get('/api/admin/users')).status).toBe(403);
    expect((await request(t.app).get('/api/admin/users')).status).toBe(401);
  });
});

describe('PATCH /api/admin/users/:id', () => {
  it('disables an account, which ends its session at once (audited)', async () => {
    const dee = await userId(DEMO.viewer.email);
    const deeAgent = await t.signIn(DEMO.viewer.email);
    const res = await admin.patch(`/api/admin/users/${dee}`).send({ disabled: true });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ id: dee, disabled: true });
    expect((await deeAgent.get('/api/auth/me')).status).toBe(401);
    const signIn = await request(t.app).post('/api/auth/sign-in').send({ email: DEMO.viewer.email, password: DEMO.viewer.password });
    expect(signIn.status).toBe(401);
    const audit = (await t.db('audit_log').where({ action: 'user.update', target: `user:${dee}` }).first()) as { details: string } | undefined;
    expect(JSON.parse(audit!.details)).toEqual({ disabled: true });
    const back = await admin.patch(`/api/admin/users/${dee}`).send({ disabled: false });
    expect(back.body.user.disabled).toBe(false);
    expect((await t.anon().post('/api/auth/sign-in').send({ email: DEMO.viewer.email, password: DEMO.viewer.password })).status).toBe(200);
  });

  it('makes a member a site admin', async () => {
    const cyd = await userId(DEMO.editor.email);
    const res = await admin.patch(`/api/admin/users/${cyd}`).send({ role: 'admin' });
    expect(res.status).toBe(200);
    expect(res.body.user.role).toBe('admin');
    expect((await (await t.as(DEMO.editor.email)).get('/api/admin/users')).status).toBe(200);
  });

  it('an admin cannot demote or disable themselves', async () => {
    const ada = await userId(DEMO.admin.email);
    const demote = await admin.patch(`/api/admin/users/${ada}`).send({ role: 'member' });
    expect(demote.status).toBe(409);
    expect(demote.body.error).toMatchObject({ code: 'self_lockout', field: 'role' });
    const disable = await admin.patch(`/api/admin/users/${ada}`).send({ disabled: true });
    expect(disable.status).toBe(409);
    expect(disable.body.error.field).toBe('disabled');
  });

  it('400 naming the field, 404 unknown user', async () => {
    const dee = await userId(DEMO.viewer.email);
    const empty = await admin.patch(`/api/admin/users/${dee}`).send({});
    expect(empty.status).toBe(400);
    expect(empty.body.error.field).toBe('role');
    const badRole = await admin.patch(`/api/admin/users/${dee}`).send({ role: 'root' });
    expect(badRole.body.error.field).toBe('role');
    const badFlag = await admin.patch(`/api/admin/users/${dee}`).send({ disabled: 'yes' });
    expect(badFlag.status).toBe(400);
    expect(badFlag.body.error.field).toBe('disabled');
    const badId = await admin.patch('/api/admin/users/zero').send({ disabled: true });
    expect(badId.body.error.field).toBe('id');
    expect((await admin.patch('/api/admin/users/9999').send({ disabled: true })).status).toBe(404);
  });

  it('403 for a member, 401 signed out', async () => {
    const dee = await userId(DEMO.viewer.email);
    expect((await owner.patch(`/api/admin/users/${dee}`).send({ disabled: true })).status).toBe(403);
    expect((await t.anon().patch(`/api/admin/users/${dee}`).send({ disabled: true })).status).toBe(401);
    const row = (await t.db('users').where({ id: dee }).first('disabled')) as { disabled: number };
    expect(Boolean(row.disabled)).toBe(false);
  });
});

describe('POST /api/admin/invitations', () => {
  it('invites a site admin or a member, optionally into a group', async () => {
    const plain = await admin.post('/api/admin/invitations').send({ email: 'new.admin@example.org', role: 'admin' });
    expect(plain.status).toBe(201);
    expect(plain.body.invitation).toMatchObject({ email: 'new.admin@example.org', siteRole: 'admin', groupId: null, groupRole: null });
    const gid = await t.secondGroupId();
    const withGroup = await admin.post('/api/admin/invitations').send({ email: 'new.member@example.org', role: 'member', groupId: gid, groupRole: 'viewer' });
    expect(withGroup.status).toBe(201);
    expect(withGroup.body.invitation).toMatchObject({ groupId: gid, groupRole: 'viewer' });
    expect(await t.db('audit_log').where({ action: 'invitation.create' }).count({ n: '*' }).first()).toEqual({ n: 2 });
  });

  it('400 naming the field, 404 for an unknown group', async () => {
    const half = await admin.post('/api/admin/invitations').send({ email: 'x@example.org', role: 'member', groupId: 1 });
    expect(half.status).toBe(400);
    expect(half.body.error.field).toBe('groupRole');
    const role = await admin.post('/api/admin/invitations').send({ email: 'x@example.org', role: 'owner' });
    expect(role.body.error.field).toBe('role');
    const email = await admin.post('/api/admin/invitations').send({ role: 'member' });
    expect(email.body.error.field).toBe('email');
    const gone = await admin.post('/api/admin/invitations').send({ email: 'x@example.org', role: 'member', groupId: 9999, groupRole: 'viewer' });
    expect(gone.status).toBe(404);
    expect(gone.body.error.field).toBe('groupId');
  });

  it('403 for a member, 401 signed out', async () => {
    expect((await owner.post('/api/admin/invitations').send({ email: 'x@example.org', role: 'member' })).status).toBe(403);
    expect((await t.anon().post('/api/admin/invitations').send({ email: 'x@example.org', role: 'member' })).status).toBe(401);
    expect(await t.db('invitations').count({ n: '*' }).first()).toEqual({ n: 0 });
  });
});

describe('GET /api/admin/outbox', () => {
  it('shows the messages the local SMTP catcher received, newest first', async () => {
    await admin.post('/api/admin/invitations').send({ email: 'first@example.org', role: 'member' });
    await admin.post('/api/admin/invitations').send({ email: 'second@example.org', role: 'member' });
    const res = await admin.get('/api/admin/outbox');
    expect(res.status).toBe(200);
    const msgs = res.body.messages as { to: string; subject: string; text: string; createdAt: string }[];
    expect(msgs.map((m) => m.to)).toEqual(['second@example.org', 'first@example.org']);
    expect(msgs[0]!.subject).toBe('Invitation to Comoving');
    expect(msgs[0]!.text).toContain(`${t.config.appOrigin}/invite/`);
    expect(Date.parse(msgs[0]!.createdAt)).not.toBeNaN();
  });

  it('403 for a member, 401 signed out', async () => {
    expect((await owner.get('/api/admin/outbox')).status).toBe(403);
    expect((await request(t.app).get('/api/admin/outbox')).status).toBe(401);
  });
});

describe('GET /api/admin/audit', () => {
  it('pages through the trail, newest first', async () => {
    for (const name of ['A', 'B', 'C']) await owner.post('/api/groups').send({ name: `Group ${name}` });
    const p1 = await admin.get('/api/admin/audit?pageSize=2&action=group.create');
    expect(p1.status).toBe(200);
    expect(p1.body).toMatchObject({ page: 1, pageSize: 2, total: 3 });
    expect(p1.body.entries.map((e: { details: { name: string } }) => e.details.name)).toEqual(['Group C', 'Group B']);
    expect(p1.body.entries[0].userEmail).toBe(DEMO.owner.email);
    const p2 = await admin.get('/api/admin/audit?pageSize=2&page=2&action=group.create');
    expect(p2.body.entries.map((e: { details: { name: string } }) => e.details.name)).toEqual(['Group A']);
    const all = await admin.get('/api/admin/audit');
    expect(all.body.pageSize).toBe(50);
    expect(all.body.total).toBeGreaterThanOrEqual(4);
  });

  it('400 naming the query field', async () => {
    const res = await admin.get('/api/admin/audit?page=0');
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('page');
    const big = await admin.get('/api/admin/audit?pageSize=100000');
    expect(big.body.error.field).toBe('pageSize');
    const nan = await admin.get('/api/admin/audit?page=abc');
    expect(nan.body.error.field).toBe('page');
  });

  it('403 for a member, 401 signed out', async () => {
    expect((await owner.get('/api/admin/audit')).status).toBe(403);
    expect((await request(t.app).get('/api/admin/audit')).status).toBe(401);
  });
});
