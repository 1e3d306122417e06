/**
 * Sandbox limits and usage for admins: read with ranges and explanations, partial updates range-checked
 * and audited, group overrides set and cleared with null, and every change applied to the next run.
 * Expected ranges and defaults are the product's own choices (common practice), read from the schema.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';
import { DEFAULT_LIMITS, LIMIT_FIELDS, LIMIT_NAMES } from '../../shared/schemas/limits';

let t: TestApp;
let admin: Agent, owner: Agent, editor: Agent;
let demo: number, second: number;

beforeAll(async () => {
  t = await makeTestApp();
  [admin, owner, editor] = await Promise.all([t.signIn(DEMO.admin.email), t.signIn(DEMO.owner.email), t.signIn(DEMO.editor.email)]);
  demo = await t.demoGroupId();
  second = await t.secondGroupId();
});
afterAll(async () => {
  await t.close();
});

describe('site-wide limits', () => {
  it('shows limits, defaults, ranges and explanations to admins only', async () => {
    const res = await admin.get('/api/admin/limits');
    expect(res.status).toBe(200);
    expect(res.body.limits).toEqual(DEFAULT_LIMITS);
    expect(res.body.defaults).toEqual(DEFAULT_LIMITS);
    expect(Object.keys(res.body.fields).sort()).toEqual([...LIMIT_NAMES].sort());
    for (const n of LIMIT_NAMES) {
      expect(res.body.fields[n].min).toBeLessThanOrEqual(res.body.fields[n].default);
      expect(res.body.fields[n].max).toBeGreaterThanOrEqual(res.body.fields[n].default);
      expect(res.body.fields[n].explanation.length).toBeGreaterThan(10);
    }
    expect((await owner.get('/api/admin/limits')).status).toBe(403);
    expect((await t.anon().get('/api/admin/limits')).status).toBe(401);
  });

  it('updates some fields, keeps the rest, and audits the change', async () => {
    const res = await admin.put('/api/admin/limits').send({ wallTimeMs: 3000, kernelCalls: 500 });
    expect(res.status).toBe(200);
    expect(res.body.limits).toEqual({ ...DEFAULT_LIMITS, wallTimeMs: 3000, kernelCalls: 500 });
    expect((await admin.get('/api/admin/limits')).body.limits.wallTimeMs).toBe(3000);
    const entry = (await t.db('audit_log').where({ action: 'sandbox.limits.update' }).orderBy('id', 'desc').first()) as { details: string };
    expect(JSON.parse(entry.details)).toEqual({
      wallTimeMs: { from: DEFAULT_LIMITS.wallTimeMs, to: 3000 },
      kernelCalls: { from: DEFAULT_LIMITS.kernelCalls, to: 500 },
    });
  });

  it('refuses values out of range, naming the field, and changes nothing', async () => {
    const max = LIMIT_FIELDS.memoryMb.max;
    const res = await admin.put('/api/admin/limits').send({ memoryMb: max + 1, wallTimeMs: 4000 });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_input', field: 'memoryMb' });
    expect(res.body.error.message).toContain(`memoryMb must be at most ${max} MB`);
    const unknown = await admin.put('/api/admin/limits').send({ cpuCores: 4 });
    expect(unknown.status).toBe(400);
    const frac = await admin.put('/api/admin/limits').send({ stackKb: 100.5 });
    expect(frac.status).toBe(400);
    expect(frac.body.error.field).toBe('stackKb');
    expect((await admin.get('/api/admin/limits')).body.limits.wallTimeMs).toBe(3000);
  });

  it('applies to the next run', async () => {
    await admin.put('/api/admin/limits').send({ kernelCalls: 3 }).expect(200);
    const res = await editor.post('/api/runs').send({ source: 'const u = universe({H0: 70, omegaM: 0.3});\nfor (let i = 0; i < 10; i++) u.E(i);', language: 'js' });
    expect(res.body.run.status).toBe('limit');
    expect(res.body.run.error).toEqual({ message: 'Stopped by the kernel calls limit of 3 calls', limit: 'kernelCalls', line: 2, column: 33 });
    expect(res.body.run.limits.kernelCalls).toBe(3);
    await admin.put('/api/admin/limits').send({ kernelCalls: DEFAULT_LIMITS.kernelCalls }).expect(200);
  });
});

describe('group overrides', () => {
  it('sets overrides for one group only and clears them with null', async () => {
    const set = await admin.put(`/api/admin/groups/${second}/limits`).send({ outputKb: 1, arrayLength: 10 });
    expect(set.status).toBe(200);
    expect(set.body.overrides).toEqual({ outputKb: 1, arrayLength: 10 });
    expect(set.body.effective).toMatchObject({ outputKb: 1, arrayLength: 10, wallTimeMs: 3000 });
    expect((await admin.get(`/api/admin/groups/${demo}/limits`)).body.overrides).toEqual({});

    const inSecond = await owner.post('/api/runs').send({ source: 'linspace(0, 1, 11);', language: 'js', groupId: second });
    expect(inSecond.body.run.error).toEqual({
      message: 'Stopped by the array length per call limit of 10 elements: linspace got 11 elements in n', limit: 'arrayLength', line: 1, column: 9,
    });
    const inDemo = await owner.post('/api/runs').send({ source: 'linspace(0, 1, 11);', language: 'js', groupId: demo });
    expect(inDemo.body.run.status).toBe('done');

    const cleared = await admin.put(`/api/admin/groups/${second}/limits`).send({ arrayLength: null });
    expect(cleared.body.overrides).toEqual({ outputKb: 1 });
    expect(cleared.body.effective.arrayLength).toBe(DEFAULT_LIMITS.arrayLength);
    const audit = await t.db('audit_log').where({ action: 'sandbox.group_limits.update', target: `group:${second}` }).count({ n: '*' });
    expect(Number(audit[0].n)).toBe(2);
    await admin.put(`/api/admin/groups/${second}/limits`).send({ outputKb: null }).expect(200);
  });

  it('refuses unknown groups and bad values', async () => {
    expect((await admin.get('/api/admin/groups/99999/limits')).status).toBe(404);
    const bad = await admin.put(`/api/admin/groups/${demo}/limits`).send({ wallTimeMs: 1 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('wallTimeMs');
    expect((await owner.put(`/api/admin/groups/${demo}/limits`).send({ wallTimeMs: 1000 })).status).toBe(403);
  });
});

describe('usage', () => {
  it('reports runs and CPU by group and member, stops by limit, and slow recipes', async () => {
    await editor.post('/api/runs').send({ source: 'while (true) {}', language: 'js', groupId: demo });
    await editor.post('/api/runs').send({ source: 'throw new Error("x")', language: 'js', groupId: demo });
    const res = await admin.get('/api/admin/usage');
    expect(res.status).toBe(200);
    const runs = (await t.db('runs').select('group_id', 'user_id', 'status', 'error_limit', 'cpu_ms')) as {
      group_id: number | null; user_id: number; status: string; error_limit: string | null; cpu_ms: number;
    }[];
    const demoRuns = runs.filter((r) => r.group_id === demo);
    const demoRow = res.body.byGroup.find((g: { groupId: number }) => g.groupId === demo);
    expect(demoRow).toMatchObject({
      name: 'Lindqvist Lab — Survey Cosmology',
      runs: demoRuns.length,
      failures: demoRuns.filter((r) => r.status === 'error' || r.status === 'limit').length,
    });
    expect(demoRow.cpuMs).toBeCloseTo(demoRuns.reduce((s, r) => s + r.cpu_ms, 0), 2);
    const cyd = res.body.byUser.find((u: { email: string }) => u.email === DEMO.editor.email);
    expect(cyd.runs).toBe(runs.filter((r) => r.user_id === cyd.userId).length);
    const byLimit = Object.fromEntries(res.body.failuresByLimit.map((f: { limit: string; count: number }) => [f.limit, f.count]));
    expect(byLimit.wallTimeMs).toBe(runs.filter((r) => r.error_limit === 'wallTimeMs').length);
    expect(byLimit.kernelCalls).toBe(1);
    expect(Array.isArray(res.body.slowestRecipes)).toBe(true);
    expect((await editor.get('/api/admin/usage')).status).toBe(403);
  });
});
