/**
 * Runs API: a run waits and comes back with its provenance; it is stored and can be read and listed by
 * the group's members only; same inputs give the same outputs; cancel stops a running script; too many
 * runs at once is a 429 naming the limit. SHA-256 is checked against the system's sha256sum.
 */
import { spawnSync } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';
import { universe, KERNEL_VERSION } from '../../server/kernel/index';
import { DEFAULT_LIMITS } from '../../shared/schemas/limits';
import { recoverInterruptedRuns } from '../../server/services/runs';

let t: TestApp;
let owner: Agent, editor: Agent, viewer: Agent, admin: Agent;
let demo: number, second: number;

beforeAll(async () => {
  t = await makeTestApp();
  [owner, editor, viewer, admin] = await Promise.all([
    t.signIn(DEMO.owner.email), t.signIn(DEMO.editor.email), t.signIn(DEMO.viewer.email), t.signIn(DEMO.admin.email),
  ]);
  demo = await t.demoGroupId();
  second = await t.secondGroupId();
});
afterAll(async () => {
  await t.close();
});

const SOURCE = `const h = param('H0', {default: 70, min: 40, max: 100, unit: 'km/s/Mpc'});
const u = universe({H0: h, omegaM: 0.3});
const z: Float64Array = linspace(0.1, 1, 4);
show.value('age', u.age(0), 'Gyr');
show.table('distances', [{name: 'z', values: z}, {name: 'dL', unit: 'Mpc', values: u.luminosityDistance(z)}]);
print('noise', random());
`;

function sha256sum(text: string): string {
  const p = spawnSync('sha256sum', { input: text, encoding: 'utf8' });
  return p.stdout.split(/\s+/)[0];
}

describe('POST /api/runs', () => {
  it('runs a script and answers 201 with outputs and provenance', async () => {
    const res = await editor.post('/api/runs').send({ source: SOURCE, params: { H0: 67.5 }, seed: 42, groupId: demo });
    expect(res.status).toBe(201);
    const run = res.body.run;
    expect(run.status).toBe('done');
    expect(run.error).toBeNull();
    // Source of the numbers: the kernel itself, called directly.
    const u = universe({ H0: 67.5, omegaM: 0.3 });
    expect(run.outputs[0]).toEqual({ kind: 'value', name: 'age', value: u.age(0), unit: 'Gyr' });
    expect(run.outputs[1].columns).toEqual([{ name: 'z' }, { name: 'dL', unit: 'Mpc' }]);
    expect(run.outputs[1].rows[3][1]).toBe(u.luminosityDistance(1));
    expect(run.logs).toHaveLength(1);
    expect(run).toMatchObject({
      groupId: demo, language: 'ts', params: { H0: 67.5 }, seed: 42, kernelVersion: KERNEL_VERSION,
      sourceHash: sha256sum(SOURCE), limits: DEFAULT_LIMITS, source: SOURCE, notebookId: null, recipeId: null,
    });
    expect(run.declaredParams).toEqual([{ name: 'H0', default: 70, min: 40, max: 100, unit: 'km/s/Mpc' }]);
    expect(run.durationMs).toBeGreaterThanOrEqual(0);
    expect(typeof run.createdAt).toBe('string');
    expect(typeof run.finishedAt).toBe('string');
  });

  it('gives identical outputs for the same source, parameters and seed', async () => {
    const a = await editor.post('/api/runs').send({ source: SOURCE, params: { H0: 71 }, seed: 7, groupId: demo });
    const b = await owner.post('/api/runs').send({ source: SOURCE, params: { H0: 71 }, seed: 7, groupId: demo });
    expect(a.body.run.id).not.toBe(b.body.run.id);
    expect(b.body.run.outputs).toEqual(a.body.run.outputs);
    expect(b.body.run.logs).toEqual(a.body.run.logs);
  });

  it('stores script errors with line and column in the user’s source', async () => {
    const res = await editor.post('/api/runs').send({ source: 'const a: number = 1;\nconst b = a.toFixed(2).nope.x;', language: 'ts' });
    expect(res.status).toBe(201);
    expect(res.body.run.status).toBe('error');
    expect(res.body.run.error).toEqual({ message: "TypeError: cannot read property 'x' of undefined", line: 2, column: 24 });
    const syntax = await editor.post('/api/runs').send({ source: 'let x = ;', language: 'js' });
    expect(syntax.body.run.status).toBe('error');
    expect(syntax.body.run.error.message).toMatch(/^SyntaxError: /);
    expect(syntax.body.run.error.line).toBe(1);
  });

  it('refuses bad bodies with the field named', async () => {
    const res = await editor.post('/api/runs').send({ source: 'print(1)', language: 'python' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.field).toBe('language');
    const p = await editor.post('/api/runs').send({ source: 'print(1)', params: { a: 'x' } });
    expect(p.status).toBe(400);
    expect(p.body.error.field).toBe('params.a');
  });

  it('needs a signed-in member of the group for a group run (viewers run but cannot save)', async () => {
    expect((await t.anon().post('/api/runs').send({ source: 'print(1)' })).status).toBe(401);
    expect((await viewer.post('/api/runs').send({ source: 'print(1)', groupId: demo })).status).toBe(201);
    // The viewer is not a member of the second group at all.
    expect((await viewer.post('/api/runs').send({ source: 'print(1)', groupId: second })).status).toBe(403);
    expect((await viewer.post('/api/runs').send({ source: 'print(1)' })).status).toBe(201);
  });

  it('stops at a dataset the group does not have, naming it', async () => {
    const res = await editor.post('/api/runs').send({ source: `const d = dataset('no-such-table');`, groupId: demo });
    expect(res.status).toBe(201);
    expect(res.body.run.status).toBe('error');
    expect(res.body.run.error).toEqual({ message: 'dataset: the group has no dataset named "no-such-table"', line: 1, column: 11 });
  });
});

describe('reading and listing runs', () => {
  let groupRun: number;
  let privateRun: number;
  beforeAll(async () => {
    groupRun = (await editor.post('/api/runs').send({ source: 'show.value("x", 1)', groupId: demo, blockId: 'b-1' })).body.run.id;
    privateRun = (await editor.post('/api/runs').send({ source: 'show.value("mine", 2)' })).body.run.id;
  });

  it('lets every member of the group read a group run, and nobody else', async () => {
    expect((await viewer.get(`/api/runs/${groupRun}`)).status).toBe(200);
    expect((await owner.get(`/api/runs/${groupRun}`)).body.run.outputs).toEqual([{ kind: 'value', name: 'x', value: 1 }]);
    expect((await t.anon().get(`/api/runs/${groupRun}`)).status).toBe(401);
    const kesslerOnly = (await owner.post('/api/runs').send({ source: 'print(1)', groupId: second })).body.run.id;
    expect((await viewer.get(`/api/runs/${kesslerOnly}`)).status).toBe(403);
  });

  it('lets only the author (and a site admin) read a run without a group', async () => {
    expect((await editor.get(`/api/runs/${privateRun}`)).status).toBe(200);
    expect((await owner.get(`/api/runs/${privateRun}`)).status).toBe(404);
    expect((await admin.get(`/api/runs/${privateRun}`)).status).toBe(200);
    expect((await editor.get('/api/runs/999999')).status).toBe(404);
    expect((await editor.get('/api/runs/abc')).status).toBe(400);
  });

  it('lists a group’s runs newest first, paged and filtered by block', async () => {
    const page = await viewer.get(`/api/runs?groupId=${demo}&pageSize=2&page=1`);
    expect(page.status).toBe(200);
    expect(page.body.runs).toHaveLength(2);
    expect(page.body.total).toBeGreaterThanOrEqual(4);
    expect(page.body.runs[0].id).toBeGreaterThan(page.body.runs[1].id);
    expect(page.body.runs[0].source).toBeUndefined();
    const p2 = await viewer.get(`/api/runs?groupId=${demo}&pageSize=2&page=2`);
    expect(p2.body.runs[0].id).toBeLessThan(page.body.runs[1].id);
    const byBlock = await viewer.get(`/api/runs?groupId=${demo}&blockId=b-1`);
    expect(byBlock.body.runs.map((r: { id: number }) => r.id)).toEqual([groupRun]);
    expect((await viewer.get(`/api/runs?groupId=${second}`)).status).toBe(403);
    const mine = await editor.get('/api/runs');
    expect(mine.body.runs.every((r: { userId: number }) => r.userId === mine.body.runs[0].userId)).toBe(true);
  });
});

describe('cancel and concurrency', () => {
  it('cancels a running run', async () => {
    const started = editor.post('/api/runs').send({ source: 'while (true) {}', language: 'js', groupId: demo }).then((r) => r);
    // Wait until the run is stored as running, then cancel it.
    let id: number | undefined;
    for (let i = 0; i < 100 && id === undefined; i++) {
      await new Promise((r) => setTimeout(r, 50));
      const row = (await t.db('runs').where({ status: 'running', source: 'while (true) {}' }).first('id')) as { id: number } | undefined;
      id = row?.id;
    }
    expect(id).toBeDefined();
    expect((await viewer.post(`/api/runs/${id}/cancel`)).status).toBe(403);
    const cancel = await editor.post(`/api/runs/${id}/cancel`);
    expect(cancel.status).toBe(200);
    expect(cancel.body.run.status).toBe('cancelled');
    expect(cancel.body.run.error).toEqual({ message: 'Cancelled' });
    const res = await started;
    expect(res.status).toBe(201);
    expect(res.body.run.status).toBe('cancelled');
  });

  it('refuses a run beyond the concurrent runs limit with 429 naming it', async () => {
    await admin.put('/api/admin/limits').send({ concurrentRuns: 1, wallTimeMs: 1500 }).expect(200);
    try {
      const first = editor.post('/api/runs').send({ source: 'while (true) {}', language: 'js' }).then((r) => r);
      for (let i = 0; i < 100; i++) {
        await new Promise((r) => setTimeout(r, 30));
        if (await t.db('runs').where({ status: 'running' }).first('id')) break;
      }
      const second = await editor.post('/api/runs').send({ source: 'print(1)' });
      expect(second.status).toBe(429);
      expect(second.body.error).toEqual({
        code: 'limit',
        limit: 'concurrentRuns',
        message: 'You already have 1 run going: the concurrent runs per user limit of 1 runs allows no more until one finishes.',
      });
      // Another member is not affected.
      expect((await owner.post('/api/runs').send({ source: 'print(1)' })).status).toBe(201);
      const done = await first;
      expect(done.body.run.status).toBe('limit');
      expect(done.body.run.error).toEqual({ message: 'Stopped by the wall time limit of 1500 ms', limit: 'wallTimeMs' });
      expect((await editor.post('/api/runs').send({ source: 'print(1)' })).status).toBe(201);
    } finally {
      await admin.put('/api/admin/limits').send({ concurrentRuns: DEFAULT_LIMITS.concurrentRuns, wallTimeMs: DEFAULT_LIMITS.wallTimeMs }).expect(200);
    }
  });
});

describe('after a restart', () => {
  it('marks runs cut off by the previous process as errors', async () => {
    const [row] = (await t.db('runs')
      .insert({ user_id: null, group_id: demo, status: 'running', language: 'js', source: 'x', source_hash: 'h', params: '{}', seed: 1, limits: '{}', kernel_version: KERNEL_VERSION })
      .returning('id')) as { id: number }[];
    expect(await recoverInterruptedRuns(t.db)).toBeGreaterThanOrEqual(1);
    const run = (await owner.get(`/api/runs/${row.id}`)).body.run;
    expect(run.status).toBe('error');
    expect(run.error).toEqual({ message: 'The server stopped while this run was going; run it again.' });
    expect(run.finishedAt).not.toBeNull();
  });
});
