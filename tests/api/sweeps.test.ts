import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createSandbox } from '../../server/sandbox/index';
import { createSweepQueue } from '../../server/services/sweeps/index';
import type { SweepResults, SweepSummary } from '../../shared/schemas/sweeps';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';

/**
 * Closed form of the age of a flat universe of matter and Λ without radiation:
 * t0 = 2 / (3 H0 √Ω_Λ) · asinh(√(Ω_Λ/Ω_m)) (e.g. Carroll, Press & Turner 1992, ARA&A 30, 499, eq. 17).
 * 977.792221… Gyr·km/s/Mpc is 1/H0 for H0 = 1 km/s/Mpc (IAU 2015 parsec, Julian year; from memory).
 */
function flatLcdmAgeGyr(H0: number, om: number): number {
  const ol = 1 - om;
  return (977.7922216807891 / H0) * (2 / (3 * Math.sqrt(ol))) * Math.asinh(Math.sqrt(ol / om));
}

const AGE_SCRIPT = `
const om = param('omegaM', { default: 0.3, min: 0.05, max: 0.95 });
const H0 = param('H0', { default: 70, min: 40, max: 100, unit: 'km/s/Mpc' });
const u = universe({ H0, omegaM: om, Tcmb: 0 });
show.value('age', u.age(0), 'Gyr');
show.value('q0', u.decelerationParameter(0));
`;

async function waitForEnd(agent: Agent, id: number, timeoutMs = 60_000): Promise<SweepSummary> {
  const t0 = Date.now();
  for (;;) {
    const res = await agent.get(`/api/sweeps/${id}`).expect(200);
    const s = res.body.sweep as SweepSummary;
    if (s.status !== 'running' && s.status !== 'queued') return s;
    if (Date.now() - t0 > timeoutMs) throw new Error(`sweep ${id} did not finish: ${JSON.stringify(s)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('sweeps API', () => {
  let t: TestApp;
  let editor: Agent;
  let viewer: Agent;
  let groupId: number;

  beforeAll(async () => {
    const sandbox = createSandbox();
    t = await makeTestApp({ deps: { sandbox } });
    t.deps.sweeps = createSweepQueue(t.deps);
    editor = await t.signIn(DEMO.editor.email);
    viewer = await t.signIn(DEMO.viewer.email);
    groupId = await t.demoGroupId();
  });
  afterAll(async () => {
    await t.deps.sweeps?.close();
    await t.close();
  });

  it('runs a one-input sweep and every point agrees with the closed-form age', async () => {
    const res = await editor
      .post('/api/sweeps')
      .send({ groupId, source: AGE_SCRIPT, inputs: { omegaM: { from: 0.1, to: 0.9, steps: 9, scale: 'linear' } }, fixed: { H0: 67.4 } })
      .expect(202);
    expect(res.body.sweep).toMatchObject({ status: expect.stringMatching(/queued|running/), total: 9 });
    const done = await waitForEnd(editor, res.body.sweep.id);
    expect(done).toMatchObject({ status: 'done', completed: 9, failed: 0 });
    const r = (await editor.get(`/api/sweeps/${done.id}/results`).expect(200)).body as SweepResults;
    expect(r.columns).toEqual(['omegaM', 'age', 'q0']);
    expect(r.units.age).toBe('Gyr');
    expect(r.rows).toHaveLength(9);
    for (const [om, age, q0] of r.rows as number[][]) {
      expect(Math.abs(age! / flatLcdmAgeGyr(67.4, om!) - 1)).toBeLessThan(1e-6);
      // q0 = Ω_m/2 − Ω_Λ for matter + Λ (closed form, e.g. Peebles 1993, Principles of Physical Cosmology, eq. 5.18; from memory).
      expect(q0!).toBeCloseTo(om! / 2 - (1 - om!), 8);
    }
  });

  it('lays a two-input grid out in order and downloads it as CSV with units', async () => {
    const res = await viewer
      .post('/api/sweeps')
      .send({
        groupId,
        source: AGE_SCRIPT,
        inputs: { omegaM: { values: [0.2, 0.3, 0.4] }, H0: { from: 60, to: 80, steps: 3, scale: 'log' } },
      })
      .expect(202);
    const done = await waitForEnd(viewer, res.body.sweep.id);
    expect(done.completed).toBe(9);
    const r = (await viewer.get(`/api/sweeps/${done.id}/results?format=json`).expect(200)).body as SweepResults;
    // The last input varies fastest; log steps are geometric (60, √(60·80), 80).
    expect(r.rows.map((row) => row.slice(0, 2))).toEqual([
      [0.2, 60], [0.2, Math.sqrt(4800)], [0.2, 80],
      [0.3, 60], [0.3, Math.sqrt(4800)], [0.3, 80],
      [0.4, 60], [0.4, Math.sqrt(4800)], [0.4, 80],
    ].map(([a, b]) => [a, expect.closeTo(b!, 10)]));
    const csv = await viewer.get(`/api/sweeps/${done.id}/results?format=csv`).expect(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    const lines = csv.text.trim().split(/\r\n/);
    expect(lines[0]).toBe('omegaM,H0,age [Gyr],q0,status,error');
    expect(lines).toHaveLength(10);
    const [om, H0, age] = lines[1]!.split(',').map(Number);
    expect(Math.abs(age! / flatLcdmAgeGyr(H0!, om!) - 1)).toBeLessThan(1e-6);
  });

  it('refuses bad sweeps with a clear message naming the field', async () => {
    const cases: [object, string, string?][] = [
      [{ groupId, inputs: { omegaM: { values: [0.3] } } }, 'source'],
      [{ groupId, source: AGE_SCRIPT, recipeId: 1, inputs: { omegaM: { values: [0.3] } } }, 'source'],
      [{ groupId, source: AGE_SCRIPT, inputs: {} }, 'inputs'],
      [{ groupId, source: AGE_SCRIPT, inputs: { a: { values: [1] }, b: { values: [1] }, c: { values: [1] }, d: { values: [1] } } }, 'inputs'],
      [{ groupId, source: AGE_SCRIPT, inputs: { omegaM: { values: [0.3] } }, fixed: { omegaM: 0.2 } }, 'fixed'],
      [{ groupId, source: AGE_SCRIPT, inputs: { H0: { from: 0, to: 80, steps: 3, scale: 'log' } } }, 'inputs.H0'],
      [{ groupId, source: AGE_SCRIPT, inputs: { H0: { from: 60, to: 80, steps: 0 } } }, 'inputs.H0.steps'],
      [{ groupId, source: AGE_SCRIPT, inputs: { H0: { from: 60, to: 80, steps: 3, scale: 'cubic' } } }, 'inputs.H0.scale'],
      [{ groupId: 'one', source: AGE_SCRIPT, inputs: { H0: { values: [70] } } }, 'groupId'],
      // Inputs must be declared with param() and stay inside the declared ranges.
      [{ groupId, source: AGE_SCRIPT, inputs: { w0: { values: [-1] } } }, 'inputs.w0'],
      [{ groupId, source: AGE_SCRIPT, inputs: { H0: { values: [70] } }, fixed: { w0: -1 } }, 'fixed.w0'],
      [{ groupId, source: AGE_SCRIPT, inputs: { H0: { from: 30, to: 80, steps: 3 } } }, 'inputs.H0'],
    ];
    for (const [body, field] of cases) {
      const res = await editor.post('/api/sweeps').send(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.error.field, JSON.stringify(res.body)).toBe(field);
      expect(res.body.error.message.length).toBeGreaterThan(5);
    }
  });

  it('refuses a sweep larger than the sweep-points limit, and applies a tightened limit at once', async () => {
    const admin = await t.signIn(DEMO.admin.email);
    await admin.put('/api/admin/limits').send({ sweepPoints: 20 }).expect(200);
    const res = await editor
      .post('/api/sweeps')
      .send({ groupId, source: AGE_SCRIPT, inputs: { omegaM: { from: 0.1, to: 0.9, steps: 5 }, H0: { from: 60, to: 80, steps: 5 } } })
      .expect(400);
    expect(res.body.error).toMatchObject({ code: 'limit', limit: 'sweepPoints', total: 25, max: 20 });
    expect(res.body.error.message).toBe('This sweep has 25 points; the sweep points limit is 20.');
    // A list as long as the schema allows (100 000 values) is range-checked and refused by the points limit.
    const long = await editor.post('/api/sweeps').send({ groupId, source: AGE_SCRIPT, inputs: { H0: { values: Array(100_000).fill(70) } } });
    expect(long.status).toBe(400);
    expect(long.body.error).toMatchObject({ code: 'limit', total: 100_000, max: 20 });
    await admin.put('/api/admin/limits').send({ sweepPoints: 10_000 }).expect(200);
  });

  it('checks roles: a non-member and a signed-out caller are refused', async () => {
    const other = await t.secondGroupId();
    const viewerRes = await viewer.post('/api/sweeps').send({ groupId: other, source: AGE_SCRIPT, inputs: { H0: { values: [70] } } });
    expect(viewerRes.status).toBe(403);
    await t.anon().post('/api/sweeps').send({ groupId, source: AGE_SCRIPT, inputs: { H0: { values: [70] } } }).expect(401);
    const s = await editor.post('/api/sweeps').send({ groupId, source: AGE_SCRIPT, inputs: { H0: { values: [70] } } }).expect(202);
    await waitForEnd(editor, s.body.sweep.id);
    const kessler = await t.signIn(DEMO.owner.email); // owner of both groups: allowed
    await kessler.get(`/api/sweeps/${s.body.sweep.id}`).expect(200);
    await t.anon().get(`/api/sweeps/${s.body.sweep.id}`).expect(401);
    await editor.get('/api/sweeps/999999').expect(404);
  });

  it('streams progress over Server-Sent Events and ends with the final counts', async () => {
    const res = await editor
      .post('/api/sweeps')
      .send({ groupId, source: AGE_SCRIPT, inputs: { omegaM: { from: 0.1, to: 0.9, steps: 40 } } })
      .expect(202);
    const sse = await editor.get(`/api/sweeps/${res.body.sweep.id}/events`).buffer(true).parse((r, cb) => {
      let text = '';
      r.on('data', (c: Buffer) => (text += c.toString()));
      r.on('end', () => cb(null, text));
    });
    expect(sse.headers['content-type']).toMatch(/text\/event-stream/);
    const events = String(sse.body).split('\n\n').filter((e) => e.startsWith('event:'));
    const last = events.at(-1)!;
    expect(last).toMatch(/^event: end/);
    const data = JSON.parse(last.split('\ndata: ')[1]!);
    expect(data).toMatchObject({ status: 'done', total: 40, completed: 40, failed: 0 });
  });

  it('records a failing point without stopping the others', async () => {
    const src = `const x = param('x', {default: 1, min: -10, max: 10}); if (x < 0) throw new Error('negative x'); show.value('sq', x * x);`;
    const res = await editor.post('/api/sweeps').send({ groupId, source: src, inputs: { x: { values: [-1, 2, 3] } } }).expect(202);
    const done = await waitForEnd(editor, res.body.sweep.id);
    expect(done).toMatchObject({ status: 'done', completed: 3, failed: 1 });
    const r = (await editor.get(`/api/sweeps/${done.id}/results`).expect(200)).body as SweepResults;
    expect(r.points[0]).toMatchObject({ status: 'error', error: expect.stringContaining('negative x') });
    expect(r.rows.map((row) => row[1])).toEqual([null, 4, 9]);
  });

  it('cancels a running sweep and keeps the points that finished', async () => {
    const slow = `const n = param('n', {default: 1, min: 0, max: 1e6}); let s = 0; for (let i = 0; i < 3e5; i++) s += Math.sqrt(i + n); show.value('s', s);`;
    const res = await editor.post('/api/sweeps').send({ groupId, source: slow, inputs: { n: { from: 1, to: 400, steps: 400 } } }).expect(202);
    const id = res.body.sweep.id as number;
    for (let i = 0; i < 200; i++) {
      const s = (await editor.get(`/api/sweeps/${id}`)).body.sweep as SweepSummary;
      if (s.completed >= 2) break;
      await new Promise((r) => setTimeout(r, 25));
    }
    const c = await editor.post(`/api/sweeps/${id}/cancel`).expect(200);
    expect(c.body.sweep.status).toBe('cancelled');
    expect(c.body.sweep.completed).toBeGreaterThan(0);
    expect(c.body.sweep.completed).toBeLessThan(400);
    await editor.post(`/api/sweeps/${id}/cancel`).expect(409);
  });

  it('resumes after a restart without losing or repeating a finished point', async () => {
    const slow = `const n = param('n', {default: 1, min: 0, max: 1e6}); let s = 0; for (let i = 0; i < 2e5; i++) s += Math.sqrt(i + n); show.value('s', s); show.value('n2', n * n);`;
    const res = await editor.post('/api/sweeps').send({ groupId, source: slow, inputs: { n: { from: 1, to: 60, steps: 60 } } }).expect(202);
    const id = res.body.sweep.id as number;
    for (let i = 0; i < 400; i++) {
      const s = (await editor.get(`/api/sweeps/${id}`)).body.sweep as SweepSummary;
      if (s.completed >= 5) break;
      await new Promise((r) => setTimeout(r, 25));
    }
    // "Restart": the old queue stops; a new one is built on the same database and resumes.
    await t.deps.sweeps!.close();
    const before = (await editor.get(`/api/sweeps/${id}/results`).expect(200)).body as SweepResults;
    const finishedBefore = before.points.filter((p) => p.status !== 'pending').length;
    expect(finishedBefore).toBeGreaterThan(0);
    expect(finishedBefore).toBeLessThan(60);
    expect(before.sweep.status).toBe('running');
    const queue = createSweepQueue(t.deps);
    t.deps.sweeps = queue;
    await queue.resumeUnfinished();
    const done = await waitForEnd(editor, id);
    expect(done).toMatchObject({ status: 'done', completed: 60, failed: 0 });
    const after = (await editor.get(`/api/sweeps/${id}/results`).expect(200)).body as SweepResults;
    // Points that had finished are unchanged; every n² equals n², so no point ran with wrong inputs.
    before.rows.forEach((row, i) => {
      if (before.points[i]!.status !== 'pending') expect(after.rows[i]).toEqual(row);
    });
    for (const row of after.rows) expect(row[2]).toBeCloseTo(row[0]! * row[0]!, 9);
    const count = await t.db('sweep_points').where({ sweep_id: id }).count<{ n: number }[]>({ n: '*' });
    expect(Number(count[0]!.n)).toBe(60);
  });

  it('mails the member when a sweep they asked about finishes', async () => {
    const res = await editor.post('/api/sweeps').send({ groupId, title: 'Age over H0', source: AGE_SCRIPT, inputs: { H0: { values: [60, 70] } }, notify: true }).expect(202);
    await waitForEnd(editor, res.body.sweep.id);
    const mail = await t.mailCatcher.waitFor((m) => m.to.includes(DEMO.editor.email) && m.subject.includes('Age over H0'), 10_000);
    expect(mail.subject).toBe('Sweep done: Age over H0');
    expect(mail.text).toContain('2 of 2 points ran');
    expect(mail.text).toContain(`/groups/${groupId}/sweeps/${res.body.sweep.id}`);
  });

  it('tells the form the group sweep limit and the inputs a script declares', async () => {
    const lim = await viewer.get(`/api/groups/${groupId}/sweep-limit`).expect(200);
    expect(lim.body).toEqual({ sweepPoints: 10_000 });
    const decl = await viewer.post('/api/sweeps/declarations').send({ source: AGE_SCRIPT }).expect(200);
    expect(decl.body.params.map((p: { name: string }) => p.name)).toEqual(['omegaM', 'H0']);
    expect(decl.body.params[1]).toMatchObject({ default: 70, min: 40, max: 100, unit: 'km/s/Mpc' });
    const bad = await viewer.post('/api/sweeps/declarations').send({ source: "const x = param('x', {default: y});" });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('source');
    await t.anon().post('/api/sweeps/declarations').send({ source: AGE_SCRIPT }).expect(401);
  });

  it('lists the group sweeps newest first', async () => {
    const res = await viewer.get(`/api/groups/${groupId}/sweeps`).expect(200);
    const sweeps = res.body.sweeps as SweepSummary[];
    expect(sweeps.length).toBeGreaterThan(3);
    const times = sweeps.map((s) => s.createdAt);
    expect([...times].sort().reverse()).toEqual(times);
  });
});
