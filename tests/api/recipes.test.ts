/**
 * Recipes API: declarations read from the source, versions and stale saves, restore, copy between the
 * demo's two groups, input checks before a run, and the role checks. The run tests compare a recipe's χ²
 * with an independent computation (astropy + numpy through /usr/bin/python3).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';
import { resolveRecipes } from '../../server/services/recipes';
import { EXAMPLE_DATASETS, RUN_DEPS, chi2Recipe, independentChi2, independentMarginalisedChi2 } from './recipe-run-helpers';
import { exampleRecipes } from '../../server/db/seed/recipes';
import path from 'node:path';

let t: TestApp;
let owner: Agent, editor: Agent, viewer: Agent;
let demo: number, second: number;

const SRC_V1 = `// Luminosity distance at one redshift.
const H0 = param('H0', { default: 70, min: 50, max: 90, unit: 'km/s/Mpc', label: 'Hubble constant' });
const z = param('z', { default: 1, min: 0, max: 10 });
const u = universe({ H0, omegaM: 0.3 });
show.value('dL', u.luminosityDistance(z), 'Mpc');
`;
const SRC_V2 = SRC_V1.replace("param('z', { default: 1, min: 0, max: 10 })", "param('z', { default: 0.5, min: 0, max: 5 })");

beforeAll(async () => {
  t = await makeTestApp(RUN_DEPS());
  [owner, editor, viewer] = await Promise.all([t.signIn(DEMO.owner.email), t.signIn(DEMO.editor.email), t.signIn(DEMO.viewer.email)]);
  demo = await t.demoGroupId();
  second = await t.secondGroupId();
});
afterAll(async () => {
  await t?.close();
});

describe('create and read', () => {
  let id: number;
  it('an editor saves a recipe; its param() declarations are read from the source', async () => {
    const res = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'dl-at-z', description: 'one distance', source: SRC_V1 });
    expect(res.status).toBe(201);
    const r = res.body.recipe;
    id = r.id;
    expect(r).toMatchObject({ groupId: demo, name: 'dl-at-z', description: 'one distance', version: 1, language: 'ts', source: SRC_V1 });
    expect(r.params).toEqual([
      { name: 'H0', default: 70, min: 50, max: 90, unit: 'km/s/Mpc', label: 'Hubble constant', line: 2, column: 12 },
      { name: 'z', default: 1, min: 0, max: 10, line: 3, column: 11 },
    ]);
  });

  it('a viewer lists and reads it', async () => {
    const list = await viewer.get(`/api/groups/${demo}/recipes`);
    expect(list.status).toBe(200);
    const item = list.body.recipes.find((x: { name: string }) => x.name === 'dl-at-z');
    expect(item).toMatchObject({ id, description: 'one distance', version: 1, updatedByName: DEMO.editor.name });
    expect(item.params.map((p: { name: string }) => p.name)).toEqual(['H0', 'z']);
    const got = await viewer.get(`/api/recipes/${id}`);
    expect(got.status).toBe(200);
    expect(got.body.recipe.source).toBe(SRC_V1);
  });

  it('reads declarations from a JavaScript recipe too', async () => {
    const src = "/* plain JS */\nconst n = param('n', { default: 3, min: 1, max: 9, label: 'count' });\nshow.value('n', n);\n";
    const res = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'js-recipe', language: 'js', source: src });
    expect(res.status).toBe(201);
    expect(res.body.recipe).toMatchObject({ language: 'js', params: [{ name: 'n', default: 3, min: 1, max: 9, label: 'count', line: 2, column: 11 }] });
    const run = await viewer.post(`/api/recipes/${res.body.recipe.id}/run`).send({ inputs: { n: 7 } });
    expect(run.status).toBe(201);
    expect(run.body.run.outputs).toContainEqual(expect.objectContaining({ kind: 'value', name: 'n', value: 7 }));
  });

  it('the name is unique in the group and slug-like', async () => {
    const dup = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'dl-at-z', source: SRC_V1 });
    expect(dup.status).toBe(409);
    expect(dup.body.error).toMatchObject({ code: 'name_taken', field: 'name' });
    const bad = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'Not A Slug', source: SRC_V1 });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('name');
  });

  const refusals: { what: string; source: string; code: string; line: number; column: number; says: RegExp }[] = [
    { what: 'a computed default', source: "const d = 70;\nconst H0 = param('H0', { default: d, min: 50, max: 90 });", code: 'invalid_param_declaration', line: 2, column: 35, says: /number literal/ },
    { what: 'a computed name', source: "const n = 'H0';\nparam(n, { default: 1 });", code: 'invalid_param_declaration', line: 2, column: 7, says: /string literal/ },
    { what: 'options that are not an object literal', source: "const o = { default: 1 };\n\nparam('a', o);", code: 'invalid_param_declaration', line: 3, column: 12, says: /object literal/ },
    { what: 'a spread in the options', source: "const o = { min: 0 };\nparam('a', { default: 1, ...o });", code: 'invalid_param_declaration', line: 2, column: 26, says: /plain "key: value"/ },
    { what: 'an unknown option', source: "param('a', { default: 1, step: 2 });", code: 'invalid_param_declaration', line: 1, column: 26, says: /unknown option "step"/ },
    { what: 'a missing default', source: "param('a', { min: 0, max: 1 });", code: 'invalid_param_declaration', line: 1, column: 1, says: /needs a default/ },
    { what: 'a default outside the range', source: "param('a', { default: 5, min: 0, max: 1 });", code: 'invalid_param_declaration', line: 1, column: 1, says: /above max 1/ },
    { what: 'a name declared twice', source: "param('a', { default: 1 });\nparam('a', { default: 2 });", code: 'invalid_param_declaration', line: 2, column: 1, says: /declared twice/ },
    { what: 'a syntax error', source: 'const x = ;', code: 'syntax_error', line: 1, column: 11, says: /syntax error/ },
  ];
  for (const r of refusals) {
    it(`refuses ${r.what} with its line and column`, async () => {
      const res = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'refused', source: r.source });
      expect(res.status).toBe(400);
      expect(res.body.error).toMatchObject({ code: r.code, field: 'source', line: r.line, column: r.column });
      expect(res.body.error.message).toMatch(r.says);
      expect(await t.db('recipes').where({ name: 'refused' }).first()).toBeUndefined();
    });
  }
});

describe('versions', () => {
  let id: number;
  beforeAll(async () => {
    id = (await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'versioned', description: 'first', source: SRC_V1 })).body.recipe.id;
  });

  it('a save on top of the latest version makes the next one, with new declarations', async () => {
    const res = await owner.put(`/api/recipes/${id}`).send({ source: SRC_V2, baseVersion: 1, message: 'smaller z range' });
    expect(res.status).toBe(200);
    expect(res.body.recipe).toMatchObject({ version: 2, description: 'first', updatedByName: DEMO.owner.name });
    expect(res.body.recipe.params.find((p: { name: string }) => p.name === 'z')).toMatchObject({ default: 0.5, max: 5 });
  });

  it('a save from an older version is refused as stale and stores nothing', async () => {
    const res = await editor.put(`/api/recipes/${id}`).send({ source: SRC_V1 + '\n// mine', baseVersion: 1 });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'stale_version', currentVersion: 2 });
    expect((await viewer.get(`/api/recipes/${id}`)).body.recipe.version).toBe(2);
  });

  it('a save with a bad declaration is refused and stores nothing', async () => {
    const res = await editor.put(`/api/recipes/${id}`).send({ source: "param('x', {default: Math.PI})", baseVersion: 2 });
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'invalid_param_declaration', line: 1, column: 22 });
    expect((await viewer.get(`/api/recipes/${id}`)).body.recipe.version).toBe(2);
  });

  it('lists versions and reads an old one', async () => {
    const list = await viewer.get(`/api/recipes/${id}/versions`);
    expect(list.status).toBe(200);
    expect(list.body.versions.map((v: { version: number }) => v.version)).toEqual([2, 1]);
    expect(list.body.versions[0]).toMatchObject({ message: 'smaller z range', createdByName: DEMO.owner.name });
    const v1 = await viewer.get(`/api/recipes/${id}/versions/1`);
    expect(v1.status).toBe(200);
    expect(v1.body.version).toMatchObject({ version: 1, source: SRC_V1, createdByName: DEMO.editor.name });
    expect((await viewer.get(`/api/recipes/${id}/versions/9`)).status).toBe(404);
    expect((await viewer.get(`/api/recipes/${id}/versions/x`)).status).toBe(400);
  });

  it('restore makes a new version with the old text', async () => {
    const res = await editor.post(`/api/recipes/${id}/restore`).send({ version: 1 });
    expect(res.status).toBe(200);
    expect(res.body.recipe).toMatchObject({ version: 3, source: SRC_V1 });
    const list = await viewer.get(`/api/recipes/${id}/versions`);
    expect(list.body.versions[0]).toMatchObject({ version: 3, restoredFrom: 1 });
    expect((await viewer.post(`/api/recipes/${id}/restore`).send({ version: 2 })).status).toBe(403);
    expect((await editor.post(`/api/recipes/${id}/restore`).send({ version: 42 })).status).toBe(404);
  });

  it('the database refuses to rewrite a stored version', async () => {
    await expect(t.db('recipe_versions').where({ recipe_id: id, version: 1 }).update({ source: 'x' })).rejects.toThrow(/immutable/);
  });
});

describe('roles and membership', () => {
  let id: number;
  beforeAll(async () => {
    id = (await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'roles', source: SRC_V1 })).body.recipe.id;
  });

  it('signed out: 401 everywhere', async () => {
    const anon = t.anon();
    expect((await anon.get(`/api/groups/${demo}/recipes`)).status).toBe(401);
    expect((await anon.post(`/api/groups/${demo}/recipes`).send({ name: 'x', source: SRC_V1 })).status).toBe(401);
    expect((await anon.get(`/api/recipes/${id}`)).status).toBe(401);
    expect((await anon.put(`/api/recipes/${id}`).send({ source: SRC_V1, baseVersion: 1 })).status).toBe(401);
    expect((await anon.post(`/api/recipes/${id}/run`).send({ inputs: {} })).status).toBe(401);
    expect((await anon.post(`/api/recipes/${id}/copy`).send({ groupId: second })).status).toBe(401);
    expect((await anon.get(`/api/recipes/${id}/versions`)).status).toBe(401);
    expect((await anon.get(`/api/recipes/${id}/versions/1`)).status).toBe(401);
    expect((await anon.post(`/api/recipes/${id}/restore`).send({ version: 1 })).status).toBe(401);
  });

  it('a viewer reads but does not save', async () => {
    expect((await viewer.get(`/api/recipes/${id}`)).status).toBe(200);
    expect((await viewer.post(`/api/groups/${demo}/recipes`).send({ name: 'by-viewer', source: SRC_V1 })).status).toBe(403);
    const put = await viewer.put(`/api/recipes/${id}`).send({ source: SRC_V2, baseVersion: 1 });
    expect(put.status).toBe(403);
    expect((await viewer.get(`/api/recipes/${id}`)).body.recipe.version).toBe(1);
  });

  it('a non-member can neither list, read nor run (403), and an unknown id is 404', async () => {
    const other = (await owner.post(`/api/groups/${second}/recipes`).send({ name: 'kessler-only', source: SRC_V1 })).body.recipe.id;
    expect((await viewer.get(`/api/groups/${second}/recipes`)).status).toBe(403);
    expect((await viewer.get(`/api/recipes/${other}`)).status).toBe(403);
    expect((await viewer.post(`/api/recipes/${other}/run`).send({ inputs: {} })).status).toBe(403);
    expect((await viewer.get(`/api/recipes/999999`)).status).toBe(404);
  });
});

describe('copy between the demo groups', () => {
  let id: number;
  beforeAll(async () => {
    id = (await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'to-copy', description: 'shared', source: SRC_V1 })).body.recipe.id;
    await editor.put(`/api/recipes/${id}`).send({ source: SRC_V2, baseVersion: 1 });
  });

  it('an editor of both groups copies the latest version; the copy starts at version 1 and remembers its origin', async () => {
    const res = await editor.post(`/api/recipes/${id}/copy`).send({ groupId: second });
    expect(res.status).toBe(201);
    expect(res.body.recipe).toMatchObject({ groupId: second, name: 'to-copy', version: 1, source: SRC_V2, description: 'shared' });
    const versions = await owner.get(`/api/recipes/${res.body.recipe.id}/versions`);
    expect(versions.body.versions[0].copiedFrom).toEqual({ recipeId: id, version: 2 });
  });

  it('an older version can be copied under another name; a taken name is 409', async () => {
    const again = await editor.post(`/api/recipes/${id}/copy`).send({ groupId: second });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('name_taken');
    const old = await editor.post(`/api/recipes/${id}/copy`).send({ groupId: second, name: 'to-copy-v1', version: 1 });
    expect(old.status).toBe(201);
    expect(old.body.recipe.source).toBe(SRC_V1);
  });

  it('needs editor in the target (403 for a viewer or a non-member)', async () => {
    expect((await viewer.post(`/api/recipes/${id}/copy`).send({ groupId: demo, name: 'x' })).status).toBe(403);
    expect((await viewer.post(`/api/recipes/${id}/copy`).send({ groupId: second })).status).toBe(403);
  });
});

describe('resolveRecipes (for recipe() in runs)', () => {
  it('returns the latest source and declarations of the named recipes of the group only', async () => {
    const got = await resolveRecipes(t.db, demo, ['versioned']);
    expect(got.versioned).toMatchObject({ version: 3, source: SRC_V1, language: 'ts' });
    expect(got.versioned.params.map((p) => p.name)).toEqual(['H0', 'z']);
    expect(Object.keys(await resolveRecipes(t.db, demo, ['kessler-only', 'no-such']))).toEqual([]);
    expect(Object.keys(await resolveRecipes(t.db, second, ['kessler-only']))).toEqual(['kessler-only']);
  });
});

describe('running a recipe', () => {
  let id: number;
  beforeAll(async () => {
    const res = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'sn-chi2-test', description: 'χ² of flat ΛCDM', source: chi2Recipe('aurora-sn-synthetic') });
    expect(res.status).toBe(201);
    id = res.body.recipe.id;
  });

  const bad: { inputs: Record<string, unknown>; field: string; says: RegExp }[] = [
    { inputs: { Hubble: 70 }, field: 'inputs.Hubble', says: /unknown input "Hubble"/ },
    { inputs: { H0: 120 }, field: 'inputs.H0', says: /above its maximum 90 km\/s\/Mpc/ },
    { inputs: { omegaM: 0.01 }, field: 'inputs.omegaM', says: /below its minimum 0.05/ },
    { inputs: { H0: 'seventy' }, field: 'inputs.H0', says: /number/ },
  ];
  for (const b of bad) {
    it(`refuses inputs ${JSON.stringify(b.inputs)} before running, naming the input`, async () => {
      const before = ((await t.db('runs').count({ n: '*' }).first()) as { n: number }).n;
      const res = await viewer.post(`/api/recipes/${id}/run`).send({ inputs: b.inputs });
      expect(res.status).toBe(400);
      expect(res.body.error.field).toBe(b.field);
      expect(res.body.error.message).toMatch(b.says);
      expect(((await t.db('runs').count({ n: '*' }).first()) as { n: number }).n).toBe(before);
    });
  }

  it('a viewer runs it; the χ² matches astropy distances with the analytic marginalisation over M', async () => {
    const inputs = { H0: 68, omegaM: 0.27 };
    const res = await viewer.post(`/api/recipes/${id}/run`).send({ inputs });
    expect(res.status).toBe(201);
    const run = res.body.run;
    expect(run.status).toBe('done');
    const out = run.outputs.find((o: { kind: string; name?: string }) => o.kind === 'value' && o.name === 'chi2');
    expect(out).toBeTruthy();
    const expected = independentMarginalisedChi2('aurora-sn-synthetic.csv', inputs.H0, inputs.omegaM);
    expect(Math.abs(out.value - expected) / expected).toBeLessThan(1e-6);
    const stored = await t.db('runs').where({ id: run.id }).first();
    expect(stored).toMatchObject({ recipe_id: id, recipe_version: 1 });
  });

  it('left-out inputs take their declared defaults', async () => {
    const res = await viewer.post(`/api/recipes/${id}/run`).send({ inputs: {} });
    expect(res.status).toBe(201);
    const out = res.body.run.outputs.find((o: { kind: string; name?: string }) => o.kind === 'value' && o.name === 'chi2');
    expect(Math.abs(out.value - independentMarginalisedChi2('aurora-sn-synthetic.csv', 70, 0.3)) / out.value).toBeLessThan(1e-6);
  });
});

describe('recipes inside scripts, old versions and the seeded examples', () => {
  let id: number;
  const value = (run: { outputs: { kind: string; name?: string; value?: number }[] }, name: string) =>
    run.outputs.find((o) => o.kind === 'value' && o.name === name)?.value;
  beforeAll(async () => {
    const res = await editor.post(`/api/groups/${demo}/recipes`).send({ name: 'nested-chi2', source: chi2Recipe('aurora-sn-synthetic') });
    id = res.body.recipe.id;
    // Version 2 looks at the H(z) table instead; version 1 stays runnable.
    await editor.put(`/api/recipes/${id}`).send({ source: chi2Recipe('aurora-hz-synthetic'), baseVersion: 1 });
  });

  it("a script calls recipe('name', inputs) and gets its shown values", async () => {
    const res = await editor.post('/api/runs').send({
      groupId: demo,
      language: 'ts',
      source: "const r = recipe('sn-chi2-test', { H0: 70, omegaM: 0.25 });\nshow.value('nested', r.chi2!);\n",
    });
    expect(res.status).toBe(201);
    expect(res.body.run.status).toBe('done');
    const expected = independentMarginalisedChi2('aurora-sn-synthetic.csv', 70, 0.25);
    expect(Math.abs(value(res.body.run, 'nested')! - expected) / expected).toBeLessThan(1e-6);
  });

  it('an older version runs when asked for, and the run records which', async () => {
    const v1 = await viewer.post(`/api/recipes/${id}/run`).send({ inputs: { omegaM: 0.3 }, version: 1 });
    expect(v1.status).toBe(201);
    expect(v1.body.run).toMatchObject({ status: 'done', recipeId: id, recipeVersion: 1 });
    const sn = independentMarginalisedChi2('aurora-sn-synthetic.csv', 70, 0.3);
    expect(Math.abs(value(v1.body.run, 'chi2')! - sn) / sn).toBeLessThan(1e-6);
    const v2 = await viewer.post(`/api/recipes/${id}/run`).send({ inputs: { omegaM: 0.3 } });
    expect(v2.body.run).toMatchObject({ status: 'done', recipeVersion: 2 });
    // The H(z) χ² is not marginalised: Σ((H − H_model)/σ)² (astropy H(z)).
    const hz = independentChi2('H', path.join(EXAMPLE_DATASETS, 'aurora-hz-synthetic.csv'), 70, 0.3);
    expect(Math.abs(value(v2.body.run, 'chi2')! - hz) / hz).toBeLessThan(1e-6);
  });

  it('every example recipe is seeded into the demo group with its declarations and description', async () => {
    const examples = exampleRecipes();
    expect(examples.map((e) => e.name)).toContain('aurora-sn-chi2');
    const list = (await viewer.get(`/api/groups/${demo}/recipes`)).body.recipes as { id: number; name: string; description: string; params: { name: string }[] }[];
    for (const e of examples) {
      const r = list.find((x) => x.name === e.name);
      expect(r, e.name).toBeTruthy();
      expect(r!.description).toBe(e.description);
      expect(r!.description.length).toBeGreaterThan(10);
      const full = (await viewer.get(`/api/recipes/${r!.id}`)).body.recipe;
      expect(full.source).toBe(e.source);
    }
    expect(list.find((x) => x.name === 'aurora-sn-chi2')!.params.map((p) => p.name)).toEqual(['omegaM', 'w0']);
  });

  it('the seeded χ² recipe, run by a viewer, matches astropy (flat wCDM with radiation) marginalised over M', async () => {
    const list = (await viewer.get(`/api/groups/${demo}/recipes`)).body.recipes as { id: number; name: string }[];
    const rid = list.find((x) => x.name === 'aurora-sn-chi2')!.id;
    const res = await viewer.post(`/api/recipes/${rid}/run`).send({ inputs: { omegaM: 0.28, w0: -0.9 } });
    expect(res.status).toBe(201);
    expect(res.body.run.status).toBe('done');
    expect(value(res.body.run, 'points')).toBe(500);
    const expected = independentChi2('mu', path.join(EXAMPLE_DATASETS, 'aurora-sn-synthetic.csv'), 70, 0.28, { tcmb: 2.7255, w0: -0.9 });
    expect(Math.abs(value(res.body.run, 'chi2')! - expected) / expected).toBeLessThan(1e-5);
  });
});
