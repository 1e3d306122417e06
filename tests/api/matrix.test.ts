/**
 * Role × route matrix for the foundation's routes: every caller kind against every route, with the
 * status the access rules demand. Group routes target the demo group, where ada is site admin
 * (and owner), bo owner, cyd editor, dee viewer, and a fresh account "eve" has no membership.
 * Memberships are reset before each cell so that one allowed change cannot decide the next cell.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { hashPassword } from '../../server/auth/password';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';

type Caller = 'admin' | 'owner' | 'editor' | 'viewer' | 'nonMember' | 'signedOut';
const CALLERS: Caller[] = ['admin', 'owner', 'editor', 'viewer', 'nonMember', 'signedOut'];

let t: TestApp;
let gid = 0;
let tmpId = 0; // a throwaway member that cells may change or remove
const agents = {} as Record<Caller, Agent>;
const ids = {} as Record<string, number>;

interface Cell {
  name: string;
  method: 'get' | 'post' | 'patch' | 'delete';
  path: () => string;
  body?: () => object;
  expect: Record<Caller, number>;
}

const ALL_SIGNED_IN = (ok: number): Record<Caller, number> => ({ admin: ok, owner: ok, editor: ok, viewer: ok, nonMember: ok, signedOut: 401 });
const MEMBERS = (ok: number): Record<Caller, number> => ({ admin: ok, owner: ok, editor: ok, viewer: ok, nonMember: 403, signedOut: 401 });
const OWNERS = (ok: number): Record<Caller, number> => ({ admin: ok, owner: ok, editor: 403, viewer: 403, nonMember: 403, signedOut: 401 });
const ADMINS = (ok: number): Record<Caller, number> => ({ admin: ok, owner: 403, editor: 403, viewer: 403, nonMember: 403, signedOut: 401 });

let inviteNo = 0;
const ROUTES: Cell[] = [
  { name: 'GET /api/health', method: 'get', path: () => '/api/health', expect: { admin: 200, owner: 200, editor: 200, viewer: 200, nonMember: 200, signedOut: 200 } },
  { name: 'GET /api/auth/me', method: 'get', path: () => '/api/auth/me', expect: ALL_SIGNED_IN(200) },
  { name: 'GET /api/groups', method: 'get', path: () => '/api/groups', expect: ALL_SIGNED_IN(200) },
  { name: 'POST /api/groups', method: 'post', path: () => '/api/groups', body: () => ({ name: 'Matrix group' }), expect: ALL_SIGNED_IN(201) },
  { name: 'GET /api/groups/:groupId', method: 'get', path: () => `/api/groups/${gid}`, expect: MEMBERS(200) },
  { name: 'GET /api/groups/:groupId/members', method: 'get', path: () => `/api/groups/${gid}/members`, expect: MEMBERS(200) },
  {
    name: 'POST /api/groups/:groupId/invitations',
    method: 'post',
    path: () => `/api/groups/${gid}/invitations`,
    body: () => ({ email: `invitee${++inviteNo}@example.org`, role: 'viewer' }),
    expect: OWNERS(201),
  },
  { name: 'PATCH /api/groups/:groupId/members/:userId', method: 'patch', path: () => `/api/groups/${gid}/members/${tmpId}`, body: () => ({ role: 'editor' }), expect: OWNERS(200) },
  { name: 'DELETE /api/groups/:groupId/members/:userId', method: 'delete', path: () => `/api/groups/${gid}/members/${tmpId}`, expect: OWNERS(204) },
  { name: 'POST /api/groups/:groupId/transfer', method: 'post', path: () => `/api/groups/${gid}/transfer`, body: () => ({ userId: tmpId }), expect: OWNERS(200) },
  { name: 'GET /api/admin/users', method: 'get', path: () => '/api/admin/users', expect: ADMINS(200) },
  { name: 'PATCH /api/admin/users/:id', method: 'patch', path: () => `/api/admin/users/${tmpId}`, body: () => ({ disabled: false }), expect: ADMINS(200) },
  {
    name: 'POST /api/admin/invitations',
    method: 'post',
    path: () => '/api/admin/invitations',
    body: () => ({ email: `site${++inviteNo}@example.org`, role: 'member' }),
    expect: ADMINS(201),
  },
  { name: 'GET /api/admin/outbox', method: 'get', path: () => '/api/admin/outbox', expect: ADMINS(200) },
  { name: 'GET /api/admin/audit', method: 'get', path: () => '/api/admin/audit', expect: ADMINS(200) },
];

async function resetMemberships(): Promise<void> {
  await t.db('memberships').where({ group_id: gid }).delete();
  await t.db('memberships').insert([
    { user_id: ids.ada, group_id: gid, role: 'owner' },
    { user_id: ids.bo, group_id: gid, role: 'owner' },
    { user_id: ids.cyd, group_id: gid, role: 'editor' },
    { user_id: ids.dee, group_id: gid, role: 'viewer' },
    { user_id: tmpId, group_id: gid, role: 'viewer' },
  ]);
}

beforeAll(async () => {
  t = await makeTestApp();
  gid = await t.demoGroupId();
  for (const [k, email] of [['ada', DEMO.admin.email], ['bo', DEMO.owner.email], ['cyd', DEMO.editor.email], ['dee', DEMO.viewer.email]] as const) {
    ids[k] = ((await t.db('users').where({ email }).first('id')) as { id: number }).id;
  }
  const hash = await hashPassword('eve-password-123');
  const [eve] = (await t.db('users').insert({ email: 'eve@outside.example', name: 'Eve Outside', password_hash: hash, role: 'member' }).returning('id')) as { id: number }[];
  const [tmp] = (await t.db('users').insert({ email: 'tmp@lindqvist-lab.example', name: 'Tmp Member', password_hash: hash, role: 'member' }).returning('id')) as { id: number }[];
  ids.eve = eve!.id;
  tmpId = tmp!.id;
  agents.admin = await t.as(DEMO.admin.email);
  agents.owner = await t.as(DEMO.owner.email);
  agents.editor = await t.as(DEMO.editor.email);
  agents.viewer = await t.as(DEMO.viewer.email);
  agents.nonMember = await t.signIn('eve@outside.example', 'eve-password-123');
  agents.signedOut = t.anon();
});
afterAll(async () => {
  await t.close();
});
beforeEach(async () => {
  await resetMemberships();
});

describe.each(ROUTES)('$name', (route) => {
  it.each(CALLERS)('%s', async (caller) => {
    let req = agents[caller][route.method](route.path());
    if (route.body) req = req.send(route.body());
    const res = await req;
    expect({ caller, status: res.status }).toEqual({ caller, status: route.expect[caller] });
    if (res.status >= 400) {
      expect(res.body.error.code).toBe(res.status === 401 ? 'unauthorized' : 'forbidden');
    }
  });
});

it('refused cells changed nothing: the throwaway member is still a viewer after every refusal', async () => {
  for (const caller of ['editor', 'viewer', 'nonMember', 'signedOut'] as const) {
    await agents[caller].patch(`/api/groups/${gid}/members/${tmpId}`).send({ role: 'owner' });
    await agents[caller].delete(`/api/groups/${gid}/members/${tmpId}`);
    await agents[caller].post(`/api/groups/${gid}/transfer`).send({ userId: tmpId });
  }
  const m = (await t.db('memberships').where({ group_id: gid, user_id: tmpId }).first('role')) as { role: string };
  expect(m.role).toBe('viewer');
});
