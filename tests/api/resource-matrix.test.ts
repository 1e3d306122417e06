/**
 * The whole sharing matrix of role × resource × action (notebooks, recipes, datasets, sweeps, runs,
 * members), walked through the API. The rule under test is the product's (DESIGN.md, issue on
 * sharing): viewers read and run, editors also save, owners also manage members; a non-member is
 * refused (403), a signed-out caller is asked to sign in (401). Site admins pass as owners.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Response } from 'supertest';
import { hashPassword } from '../../server/auth/password';
import { createSandbox } from '../../server/sandbox/index';
import { createSweepQueue } from '../../server/services/sweeps/index';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';

const HERE = path.dirname(fileURLToPath(import.meta.url));
const GOOD_SN = readFileSync(path.join(HERE, 'fixtures/datasets/good-sn.csv'));

type Who = 'admin' | 'owner' | 'editor' | 'viewer' | 'outsider' | 'anon';
const WHO: Who[] = ['admin', 'owner', 'editor', 'viewer', 'outsider', 'anon'];
const RANK = { viewer: 0, editor: 1, owner: 2 } as const;
type Need = keyof typeof RANK;

/** What each caller's role in the demo group is (admin passes as owner). */
const ROLE_OF: Record<Who, Need | null> = { admin: 'owner', owner: 'owner', editor: 'editor', viewer: 'viewer', outsider: null, anon: null };

interface Ctx {
  groupId: number;
  otherGroupId: number;
  notebookId: number;
  recipeId: number;
  datasetId: number;
  sweepId: number;
  runId: number;
  seq: number;
  t: TestApp;
}

interface Action {
  resource: string;
  action: string;
  need: Need;
  call: (a: Agent, c: Ctx) => Promise<Response>;
}

const fresh = (c: Ctx) => `m${++c.seq}`;

const ACTIONS: Action[] = [
  // notebooks
  { resource: 'notebook', action: 'list', need: 'viewer', call: (a, c) => a.get(`/api/groups/${c.groupId}/notebooks`) },
  { resource: 'notebook', action: 'read', need: 'viewer', call: (a, c) => a.get(`/api/notebooks/${c.notebookId}`) },
  { resource: 'notebook', action: 'versions', need: 'viewer', call: (a, c) => a.get(`/api/notebooks/${c.notebookId}/versions`) },
  { resource: 'notebook', action: 'create', need: 'editor', call: (a, c) => a.post(`/api/groups/${c.groupId}/notebooks`).send({ title: fresh(c) }) },
  {
    resource: 'notebook',
    action: 'save',
    need: 'editor',
    call: async (a, c) => {
      const cur = await c.t.db('notebooks').where({ id: c.notebookId }).first<{ current_version: number }>('current_version');
      return a.put(`/api/notebooks/${c.notebookId}`).send({ baseVersion: cur.current_version, blocks: [{ id: fresh(c), kind: 'note', source: 'matrix' }], message: 'matrix' });
    },
  },
  { resource: 'notebook', action: 'restore', need: 'editor', call: (a, c) => a.post(`/api/notebooks/${c.notebookId}/restore`).send({ version: 1 }) },
  // recipes
  { resource: 'recipe', action: 'list', need: 'viewer', call: (a, c) => a.get(`/api/groups/${c.groupId}/recipes`) },
  { resource: 'recipe', action: 'read', need: 'viewer', call: (a, c) => a.get(`/api/recipes/${c.recipeId}`) },
  { resource: 'recipe', action: 'run', need: 'viewer', call: (a, c) => a.post(`/api/recipes/${c.recipeId}/run`).send({ inputs: {} }) },
  {
    resource: 'recipe',
    action: 'create',
    need: 'editor',
    call: (a, c) => a.post(`/api/groups/${c.groupId}/recipes`).send({ name: fresh(c), source: "const x = param('x', {default: 1}); show.value('x', x);" }),
  },
  {
    resource: 'recipe',
    action: 'save',
    need: 'editor',
    call: async (a, c) => {
      const r = await c.t.db('recipes').where({ id: c.recipeId }).first<{ latest_version: number }>('latest_version');
      return a.put(`/api/recipes/${c.recipeId}`).send({ baseVersion: r.latest_version, source: `show.value('v', ${c.seq++});` });
    },
  },
  // datasets
  { resource: 'dataset', action: 'list', need: 'viewer', call: (a, c) => a.get(`/api/groups/${c.groupId}/datasets`) },
  { resource: 'dataset', action: 'read', need: 'viewer', call: (a, c) => a.get(`/api/datasets/${c.datasetId}`) },
  { resource: 'dataset', action: 'download', need: 'viewer', call: (a, c) => a.get(`/api/datasets/${c.datasetId}/csv`) },
  {
    resource: 'dataset',
    action: 'upload',
    need: 'editor',
    call: (a, c) => a.post(`/api/groups/${c.groupId}/datasets`).field('name', fresh(c)).field('kind', 'distance_modulus').attach('file', GOOD_SN, 'good-sn.csv'),
  },
  // sweeps
  { resource: 'sweep', action: 'list', need: 'viewer', call: (a, c) => a.get(`/api/groups/${c.groupId}/sweeps`) },
  { resource: 'sweep', action: 'read', need: 'viewer', call: (a, c) => a.get(`/api/sweeps/${c.sweepId}`) },
  { resource: 'sweep', action: 'results', need: 'viewer', call: (a, c) => a.get(`/api/sweeps/${c.sweepId}/results`) },
  {
    resource: 'sweep',
    action: 'start',
    need: 'viewer',
    call: (a, c) => a.post('/api/sweeps').send({ groupId: c.groupId, source: "show.value('y', param('x', {default: 1}) * 2)", inputs: { x: { values: [1, 2] } } }),
  },
  // runs
  { resource: 'run', action: 'run', need: 'viewer', call: (a, c) => a.post('/api/runs').send({ groupId: c.groupId, source: "show.value('one', 1)" }) },
  { resource: 'run', action: 'read', need: 'viewer', call: (a, c) => a.get(`/api/runs/${c.runId}`) },
  { resource: 'run', action: 'list', need: 'viewer', call: (a, c) => a.get(`/api/runs?groupId=${c.groupId}`) },
  // members
  { resource: 'member', action: 'list', need: 'viewer', call: (a, c) => a.get(`/api/groups/${c.groupId}/members`) },
  { resource: 'member', action: 'invite', need: 'owner', call: (a, c) => a.post(`/api/groups/${c.groupId}/invitations`).send({ email: `${fresh(c)}@example.org`, role: 'viewer' }) },
];

describe('role × resource × action', () => {
  let t: TestApp;
  let ctx: Ctx;
  const agents = {} as Record<Who, Agent>;

  beforeAll(async () => {
    t = await makeTestApp({ deps: { sandbox: createSandbox() } });
    t.deps.sweeps = createSweepQueue(t.deps);
    // An account with no membership in the demo group.
    await t.db('users').insert({ email: 'outsider@example.org', name: 'Out Sider', password_hash: await hashPassword('outsider-password'), role: 'member' });
    agents.admin = await t.as(DEMO.admin.email);
    agents.owner = await t.as(DEMO.owner.email);
    agents.editor = await t.as(DEMO.editor.email);
    agents.viewer = await t.as(DEMO.viewer.email);
    agents.outsider = await t.as('outsider@example.org');
    agents.anon = t.anon();
    const groupId = await t.demoGroupId();
    const first = async (table: string) => ((await t.db(table).where({ group_id: groupId }).orderBy('id').first('id')) as { id: number }).id;
    const sweep = await agents.editor.post('/api/sweeps').send({ groupId, source: "show.value('y', param('x', {default: 1}))", inputs: { x: { values: [1] } } }).expect(202);
    const run = await agents.editor.post('/api/runs').send({ groupId, source: "show.value('one', 1)" }).expect(201);
    ctx = {
      t,
      groupId,
      otherGroupId: await t.secondGroupId(),
      notebookId: await first('notebooks'),
      recipeId: await first('recipes'),
      datasetId: await first('datasets'),
      sweepId: sweep.body.sweep.id,
      runId: run.body.run.id,
      seq: 0,
    };
  });
  afterAll(async () => {
    await t.deps.sweeps?.close();
    await t.close();
  });

  for (const a of ACTIONS) {
    it(`${a.resource} · ${a.action} needs ${a.need}`, async () => {
      for (const who of WHO) {
        const res = await a.call(agents[who], ctx);
        const role = ROLE_OF[who];
        const label = `${who} → ${a.resource}.${a.action}: ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`;
        if (who === 'anon') expect(res.status, label).toBe(401);
        else if (role === null || RANK[role] < RANK[a.need]) {
          expect(res.status, label).toBe(403);
          expect(res.body.error.code, label).toBe('forbidden');
        } else expect(res.status, label).toBeLessThan(300);
      }
    });
  }

  it('copies a notebook, recipe and dataset only into a group where the caller edits', async () => {
    const { groupId, otherGroupId } = ctx;
    for (const [kind, id] of [['notebooks', ctx.notebookId], ['recipes', ctx.recipeId], ['datasets', ctx.datasetId]] as const) {
      // cyd edits in both groups: allowed. dee is not a member of the target: refused.
      const ok = await agents.editor.post(`/api/${kind}/${id}/copy`).send({ groupId: otherGroupId });
      expect(ok.status, `${kind}: ${JSON.stringify(ok.body)}`).toBe(201);
      const refused = await agents.viewer.post(`/api/${kind}/${id}/copy`).send({ groupId: otherGroupId });
      expect(refused.status, `${kind}: ${JSON.stringify(refused.body)}`).toBe(403);
      // Copying back into the source group as a viewer is refused too (viewers cannot save).
      const viewerSame = await agents.viewer.post(`/api/${kind}/${id}/copy`).send({ groupId });
      expect(viewerSame.status).toBe(403);
    }
  });
});
