/**
 * Datasets API: upload, refusals with row and column, versions, download, copy between the demo's two
 * groups, delete, and the role checks. Expected table values are read from the fixture files by this
 * test's own plain line splitting, not by the server's parser.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO, makeTestApp, type Agent, type TestApp } from '../helpers/testApp';
import { resolveDatasets } from '../../server/services/datasets';
import { makeDemoDatasets } from '../../server/db/seed/make-demo-datasets';
import { DEMO_DATASETS } from '../../server/db/seed/demo-datasets-manifest';
import { EXAMPLE_DATASETS, RUN_DEPS, independentChi2 } from './recipe-run-helpers';

const FIX = path.join(import.meta.dirname, 'fixtures', 'datasets');
const fixture = (name: string) => readFileSync(path.join(FIX, name));
const fixtureText = (file: string) => readFileSync(file, 'utf8');

/** Numeric rows of a simple fixture: drop comments and the header, split on commas. */
function plainRows(name: string): number[][] {
  return fixture(name)
    .toString('utf8')
    .split('\n')
    .filter((l) => l.trim() !== '' && !l.startsWith('#'))
    .slice(1)
    .map((l) => l.split(',').map(Number));
}
function plainMatrix(name: string): number[][] {
  return fixture(name)
    .toString('utf8')
    .split('\n')
    .filter((l) => l.trim() !== '' && !l.startsWith('#'))
    .map((l) => l.split(',').map(Number));
}

let t: TestApp;
let owner: Agent, editor: Agent, viewer: Agent, admin: Agent;
let demo: number, second: number;

function upload(agent: Agent, groupId: number, name: string, kind: string, file: string | Buffer, extra: { covariance?: string | Buffer; description?: string } = {}) {
  const req = agent.post(`/api/groups/${groupId}/datasets`).field('name', name).field('kind', kind);
  if (extra.description !== undefined) req.field('description', extra.description);
  req.attach('file', typeof file === 'string' ? fixture(file) : file, { filename: typeof file === 'string' ? file : 'upload.csv', contentType: 'text/csv' });
  if (extra.covariance !== undefined) {
    const c = extra.covariance;
    req.attach('covariance', typeof c === 'string' ? fixture(c) : c, { filename: typeof c === 'string' ? c : 'cov.csv', contentType: 'text/csv' });
  }
  return req;
}

async function counts() {
  const d = (await t.db('datasets').count({ n: '*' }).first()) as { n: number };
  const v = (await t.db('dataset_versions').count({ n: '*' }).first()) as { n: number };
  return { datasets: Number(d.n), versions: Number(v.n) };
}

beforeAll(async () => {
  t = await makeTestApp(RUN_DEPS());
  [owner, editor, viewer, admin] = await Promise.all([t.signIn(DEMO.owner.email), t.signIn(DEMO.editor.email), t.signIn(DEMO.viewer.email), t.signIn(DEMO.admin.email)]);
  demo = await t.demoGroupId();
  second = await t.secondGroupId();
});
afterAll(async () => {
  await t?.close();
});

describe('upload and read', () => {
  let id: number;

  it('stores a distance-modulus table with units from the header', async () => {
    const res = await upload(editor, demo, 'test-sn', 'distance_modulus', 'good-sn.csv', { description: 'four invented points' });
    expect(res.status).toBe(201);
    const ds = res.body.dataset;
    id = ds.id;
    expect(ds).toMatchObject({ groupId: demo, name: 'test-sn', kind: 'distance_modulus', version: 1, rowCount: 4, hasCovariance: false, description: 'four invented points' });
    expect(ds.columns).toEqual([{ name: 'z' }, { name: 'mu', unit: 'mag' }, { name: 'sigma', unit: 'mag' }]);
    expect(ds.rows).toEqual(plainRows('good-sn.csv'));
  });

  it('lists it for a viewer of the group', async () => {
    const res = await viewer.get(`/api/groups/${demo}/datasets`);
    expect(res.status).toBe(200);
    const item = res.body.datasets.find((d: { name: string }) => d.name === 'test-sn');
    expect(item).toMatchObject({ id, kind: 'distance_modulus', version: 1, rowCount: 4, description: 'four invented points', hasCovariance: false });
    expect(item.createdBy.name).toBe(DEMO.editor.name);
    expect(typeof item.createdAt).toBe('string');
  });

  it('returns the table to a viewer', async () => {
    const res = await viewer.get(`/api/datasets/${id}`);
    expect(res.status).toBe(200);
    expect(res.body.dataset.rows).toEqual(plainRows('good-sn.csv'));
    expect(res.body.dataset.columns.map((c: { name: string }) => c.name)).toEqual(['z', 'mu', 'sigma']);
  });

  it('downloads the original CSV byte for byte', async () => {
    const res = await viewer.get(`/api/datasets/${id}/csv`).buffer(true).parse((r, cb) => {
      let s = '';
      r.setEncoding('utf8');
      r.on('data', (c: string) => (s += c));
      r.on('end', () => cb(null, s));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toContain('test-sn-v1.csv');
    expect(res.body).toBe(fixture('good-sn.csv').toString('utf8'));
  });

  it('takes the other kinds, matching required columns case-insensitively', async () => {
    const hz = await upload(editor, demo, 'test-hz', 'hubble', 'good-hz.csv');
    expect(hz.status).toBe(201);
    expect(hz.body.dataset.columns).toEqual([{ name: 'z' }, { name: 'H', unit: 'km/s/Mpc' }, { name: 'sigma', unit: 'km/s/Mpc' }]);
    const fs8 = await upload(editor, demo, 'test-fs8', 'fsigma8', 'good-fs8.csv');
    expect(fs8.status).toBe(201);
    expect(fs8.body.dataset.columns.map((c: { name: string }) => c.name)).toEqual(['z', 'fsigma8', 'sigma']);
    expect(fs8.body.dataset.rows).toEqual(plainRows('good-fs8.csv'));
    const tab = await upload(editor, demo, 'test-table', 'table', 'good-table.csv');
    expect(tab.status).toBe(201);
    expect(tab.body.dataset.columns).toEqual([{ name: 'r', unit: 'Mpc' }, { name: 'count' }, { name: 'weight' }]);
    expect(tab.body.dataset.rows).toEqual([[10, 3, 0.5], [20, 7, -1.25], [30, 12, 0.002]]);
  });

  it('reads Windows line endings, a byte-order mark and quoted cells', async () => {
    const text = '\uFEFF# exported from a spreadsheet\r\n"z","mu [mag]","sigma [mag]"\r\n0.1,38.3,0.1\r\n"0.2","39.9","0.12"\r\n';
    const res = await upload(editor, demo, 'test-crlf', 'distance_modulus', Buffer.from(text, 'utf8'));
    expect(res.status).toBe(201);
    expect(res.body.dataset.columns).toEqual([{ name: 'z' }, { name: 'mu', unit: 'mag' }, { name: 'sigma', unit: 'mag' }]);
    expect(res.body.dataset.rows).toEqual([[0.1, 38.3, 0.1], [0.2, 39.9, 0.12]]);
  });

  it('says so when a file uses semicolons instead of commas', async () => {
    const res = await upload(editor, demo, 'test-semicolon', 'distance_modulus', Buffer.from('z;mu;sigma\n0.1;38.3;0.1\n'));
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('missing_column');
    expect(res.body.error.message).toMatch(/separate values with ";"/);
  });

  it('stores a covariance matrix and returns it on request', async () => {
    const res = await upload(editor, demo, 'test-sn-cov', 'distance_modulus', 'good-sn.csv', { covariance: 'good-sn-cov.csv' });
    expect(res.status).toBe(201);
    expect(res.body.dataset.hasCovariance).toBe(true);
    expect(res.body.dataset.covariance).toBeUndefined();
    const got = await viewer.get(`/api/datasets/${res.body.dataset.id}?covariance=1`);
    expect(got.body.dataset.covariance).toEqual(plainMatrix('good-sn-cov.csv'));
  });
});

describe('refusals name the row, column and reason, and store nothing', () => {
  // row = line in the file (header is line 1), column = 1-based position; reasons from the brief.
  const cases: { file: string; kind: string; code: string; row?: number; column?: number; columnName?: string; says: RegExp }[] = [
    { file: 'missing-column.csv', kind: 'distance_modulus', code: 'missing_column', row: 1, columnName: 'sigma', says: /column "sigma"/ },
    { file: 'non-numeric.csv', kind: 'distance_modulus', code: 'not_a_number', row: 4, column: 2, columnName: 'mu', says: /line 4, column 2.*"abc"/i },
    { file: 'empty-cell.csv', kind: 'distance_modulus', code: 'not_a_number', row: 3, column: 2, says: /empty cell/ },
    { file: 'zero-sigma.csv', kind: 'distance_modulus', code: 'bad_sigma', row: 3, column: 3, says: /> 0, found 0/ },
    { file: 'negative-sigma.csv', kind: 'hubble', code: 'bad_sigma', row: 3, column: 3, says: /found -3/ },
    { file: 'negative-z.csv', kind: 'distance_modulus', code: 'negative_redshift', row: 3, column: 1, says: /redshift must be ≥ 0/ },
    { file: 'ragged.csv', kind: 'distance_modulus', code: 'ragged_row', row: 3, says: /2 cells but the header has 3/ },
    { file: 'duplicate-header.csv', kind: 'table', code: 'duplicate_column', row: 1, column: 3, says: /"Z" already names column 1/ },
    { file: 'empty.csv', kind: 'table', code: 'empty_file', says: /empty/ },
    { file: 'header-only.csv', kind: 'distance_modulus', code: 'no_rows', says: /no data rows/ },
    { file: 'no-header.csv', kind: 'distance_modulus', code: 'missing_header', row: 1, says: /header row is required/ },
  ];
  for (const c of cases) {
    it(`${c.file}: ${c.code}`, async () => {
      const before = await counts();
      const res = await upload(editor, demo, 'refused', c.kind, c.file);
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe(c.code);
      expect(res.body.error.field).toBe('file');
      expect(res.body.error.message).toMatch(c.says);
      if (c.row !== undefined) expect(res.body.error.row).toBe(c.row);
      if (c.column !== undefined) expect(res.body.error.column).toBe(c.column);
      if (c.columnName !== undefined) expect(res.body.error.columnName).toBe(c.columnName);
      expect(await counts()).toEqual(before);
    });
  }

  const covCases = [
    { file: 'cov-size.csv', code: 'covariance_size', says: /2 rows but the dataset has 4/ },
    { file: 'cov-asymmetric.csv', code: 'covariance_not_symmetric', row: 3, column: 4, says: /C\[3,4\] = 0\.003 differs from C\[4,3\] = 0\.005/ },
    // [[1,2],[2,1]] has eigenvalues 3 and −1, so the Cholesky pivot of row 2 is 1 − 2² < 0 (by hand).
    { file: 'cov-not-pd.csv', code: 'covariance_not_positive_definite', row: 2, column: 2, says: /not positive definite/ },
  ];
  for (const c of covCases) {
    it(`covariance ${c.file}: ${c.code}`, async () => {
      const before = await counts();
      const res = await upload(editor, demo, 'refused', 'distance_modulus', 'good-sn.csv', { covariance: c.file });
      expect(res.status).toBe(400);
      expect(res.body.error).toMatchObject({ code: c.code, field: 'covariance' });
      expect(res.body.error.message).toMatch(c.says);
      if (c.row !== undefined) expect(res.body.error.row).toBe(c.row);
      if (c.column !== undefined) expect(res.body.error.column).toBe(c.column);
      expect(await counts()).toEqual(before);
    });
  }

  it('refuses bytes that are not UTF-8 text', async () => {
    const res = await upload(editor, demo, 'refused', 'table', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0xff, 0xfe, 0x00, 0xc3]));
    expect(res.status).toBe(400);
    expect(res.body.error).toMatchObject({ code: 'not_text', field: 'file' });
  });

  it('refuses a file over the size limit with 413', async () => {
    const big = Buffer.alloc(5 * 1024 * 1024 + 10, '1');
    const res = await upload(editor, demo, 'refused', 'table', big);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('file_too_large');
    expect(res.body.error.message).toMatch(/5 MB/);
  });

  it('refuses a request without a file, a bad kind and a bad name', async () => {
    const noFile = await editor.post(`/api/groups/${demo}/datasets`).field('name', 'x').field('kind', 'table');
    expect(noFile.status).toBe(400);
    expect(noFile.body.error).toMatchObject({ code: 'file_required', field: 'file' });
    const badKind = await upload(editor, demo, 'x', 'spectra', 'good-table.csv');
    expect(badKind.status).toBe(400);
    expect(badKind.body.error.field).toBe('kind');
    const badName = await upload(editor, demo, 'Has Spaces', 'table', 'good-table.csv');
    expect(badName.status).toBe(400);
    expect(badName.body.error.field).toBe('name');
    const wrongPart = await editor
      .post(`/api/groups/${demo}/datasets`)
      .field('name', 'x')
      .field('kind', 'table')
      .attach('data', fixture('good-table.csv'), 'good-table.csv');
    expect(wrongPart.status).toBe(400);
    expect(wrongPart.body.error.code).toBe('unexpected_file');
  });
});

describe('versions', () => {
  let id: number;
  it('a second upload of a name makes version 2 and keeps version 1 as it was', async () => {
    const v1 = await upload(editor, demo, 'test-versions', 'distance_modulus', 'good-sn.csv', { description: 'first' });
    id = v1.body.dataset.id;
    const v2 = await upload(owner, demo, 'test-versions', 'hubble', 'good-hz.csv');
    expect(v2.status).toBe(201);
    expect(v2.body.dataset).toMatchObject({ id, version: 2, kind: 'hubble', rowCount: 3, description: 'first' });
    const old = await viewer.get(`/api/datasets/${id}?version=1`);
    expect(old.body.dataset).toMatchObject({ version: 1, latestVersion: 2, kind: 'distance_modulus' });
    expect(old.body.dataset.rows).toEqual(plainRows('good-sn.csv'));
    const latest = await viewer.get(`/api/datasets/${id}`);
    expect(latest.body.dataset.rows).toEqual(plainRows('good-hz.csv'));
    const csv1 = await viewer.get(`/api/datasets/${id}/csv?version=1`);
    expect(csv1.text).toBe(fixture('good-sn.csv').toString('utf8'));
  });

  it('lists versions newest first with their authors', async () => {
    const res = await viewer.get(`/api/datasets/${id}/versions`);
    expect(res.status).toBe(200);
    expect(res.body.versions.map((v: { version: number }) => v.version)).toEqual([2, 1]);
    expect(res.body.versions[0].createdBy.name).toBe(DEMO.owner.name);
    expect(res.body.versions[1].createdBy.name).toBe(DEMO.editor.name);
  });

  it('a refused new version leaves the dataset at its latest version', async () => {
    const res = await upload(editor, demo, 'test-versions', 'distance_modulus', 'zero-sigma.csv');
    expect(res.status).toBe(400);
    const latest = await viewer.get(`/api/datasets/${id}`);
    expect(latest.body.dataset.version).toBe(2);
  });

  it('a missing version is a 404 and a bad one a 400', async () => {
    expect((await viewer.get(`/api/datasets/${id}?version=9`)).status).toBe(404);
    const bad = await viewer.get(`/api/datasets/${id}?version=abc`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('version');
  });

  it('the database refuses to rewrite a stored version', async () => {
    await expect(t.db('dataset_versions').where({ dataset_id: id, version: 1 }).update({ rows_json: '[]' })).rejects.toThrow(/immutable/);
  });
});

describe('roles and membership', () => {
  it('signed out: 401 everywhere', async () => {
    const anon = t.anon();
    expect((await anon.get(`/api/groups/${demo}/datasets`)).status).toBe(401);
    expect((await upload(anon, demo, 'x', 'table', 'good-table.csv')).status).toBe(401);
    expect((await anon.get(`/api/datasets/1`)).status).toBe(401);
    expect((await anon.get(`/api/datasets/1/csv`)).status).toBe(401);
    expect((await anon.delete(`/api/datasets/1`)).status).toBe(401);
    expect((await anon.get(`/api/datasets/1/versions`)).status).toBe(401);
    expect((await anon.post(`/api/datasets/1/copy`).send({ groupId: second })).status).toBe(401);
  });

  it('a viewer may not upload or delete', async () => {
    const before = await counts();
    const res = await upload(viewer, demo, 'by-viewer', 'table', 'good-table.csv');
    expect(res.status).toBe(403);
    expect(await counts()).toEqual(before);
    const some = (await viewer.get(`/api/groups/${demo}/datasets`)).body.datasets[0];
    expect((await viewer.delete(`/api/datasets/${some.id}`)).status).toBe(403);
  });

  it('a non-member can neither list, upload nor read (403)', async () => {
    // dee is not in the second group.
    const list = await viewer.get(`/api/groups/${second}/datasets`);
    expect(list.status).toBe(403);
    expect(list.body.error.message).toMatch(/not a member/);
    expect((await upload(viewer, second, 'x', 'table', 'good-table.csv')).status).toBe(403);
    const made = await upload(owner, second, 'kessler-only', 'table', 'good-table.csv');
    expect(made.status).toBe(201);
    expect((await viewer.get(`/api/datasets/${made.body.dataset.id}`)).status).toBe(403);
    expect((await viewer.get(`/api/datasets/${made.body.dataset.id}/versions`)).status).toBe(403);
    expect((await viewer.get(`/api/datasets/${made.body.dataset.id}/csv`)).status).toBe(403);
  });

  it('a site admin passes as owner', async () => {
    const res = await upload(admin, demo, 'by-admin', 'table', 'good-table.csv');
    expect(res.status).toBe(201);
  });

  it('an unknown dataset id is 404', async () => {
    expect((await viewer.get(`/api/datasets/999999`)).status).toBe(404);
    expect((await viewer.get(`/api/datasets/abc`)).status).toBe(404);
  });
});

describe('copy between the demo groups', () => {
  let sourceId: number;
  beforeAll(async () => {
    const res = await upload(editor, demo, 'to-copy', 'distance_modulus', 'good-sn.csv', { covariance: 'good-sn-cov.csv', description: 'copy me' });
    sourceId = res.body.dataset.id;
  });

  it('an editor of both groups copies into the second group; the copy remembers its origin', async () => {
    const res = await editor.post(`/api/datasets/${sourceId}/copy`).send({ groupId: second });
    expect(res.status).toBe(201);
    const copy = res.body.dataset;
    expect(copy).toMatchObject({ groupId: second, name: 'to-copy', version: 1, kind: 'distance_modulus', hasCovariance: true, description: 'copy me' });
    expect(copy.id).not.toBe(sourceId);
    expect(copy.rows).toEqual(plainRows('good-sn.csv'));
    const versions = await owner.get(`/api/datasets/${copy.id}/versions`);
    expect(versions.body.versions[0].copiedFrom).toEqual({ datasetId: sourceId, version: 1 });
    const list = await owner.get(`/api/groups/${second}/datasets`);
    expect(list.body.datasets.map((d: { name: string }) => d.name)).toContain('to-copy');
    const csv = await owner.get(`/api/datasets/${copy.id}/csv`);
    expect(csv.text).toBe(fixture('good-sn.csv').toString('utf8'));
  });

  it('a name already in the target is a 409 unless the copy is renamed', async () => {
    const again = await editor.post(`/api/datasets/${sourceId}/copy`).send({ groupId: second });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatchObject({ code: 'name_taken', field: 'name' });
    const renamed = await editor.post(`/api/datasets/${sourceId}/copy`).send({ groupId: second, name: 'to-copy-2' });
    expect(renamed.status).toBe(201);
  });

  it('copying needs editor in the target and membership of the source (403 otherwise)', async () => {
    const made = await upload(owner, second, 'from-kessler', 'table', 'good-table.csv');
    // bo owns the second group but dee is only a viewer in the demo group: she cannot copy into it.
    expect((await viewer.post(`/api/datasets/${sourceId}/copy`).send({ groupId: demo, name: 'dup' })).status).toBe(403);
    // dee is no member of the second group.
    expect((await viewer.post(`/api/datasets/${sourceId}/copy`).send({ groupId: second })).status).toBe(403);
    // ...nor can she read a second-group dataset to copy it out (she is not even an editor in the demo group).
    expect((await viewer.post(`/api/datasets/${made.body.dataset.id}/copy`).send({ groupId: demo })).status).toBe(403);
    // cyd is an editor in both groups; a group that does not exist is a 404.
    expect((await editor.post(`/api/datasets/${sourceId}/copy`).send({ groupId: 999999 })).status).toBe(404);
    const bad = await editor.post(`/api/datasets/${sourceId}/copy`).send({ groupId: 'x' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.field).toBe('groupId');
  });
});

describe('delete', () => {
  it('an editor deletes a dataset with all its versions', async () => {
    const made = await upload(editor, demo, 'to-delete', 'table', 'good-table.csv');
    await upload(editor, demo, 'to-delete', 'table', 'good-table.csv');
    const id = made.body.dataset.id;
    const res = await editor.delete(`/api/datasets/${id}`);
    expect(res.status).toBe(204);
    expect((await viewer.get(`/api/datasets/${id}`)).status).toBe(404);
    expect(await t.db('dataset_versions').where({ dataset_id: id }).count({ n: '*' }).first()).toMatchObject({ n: 0 });
    const log = await t.db('audit_log').where({ action: 'dataset.delete', target: `dataset:${id}` }).first();
    expect(log).toBeTruthy();
  });
});

describe('resolveDatasets (for runs)', () => {
  it('returns the latest version of each named dataset of the group', async () => {
    const got = await resolveDatasets(t.db, demo, ['test-sn-cov', 'test-hz']);
    expect(Object.keys(got).sort()).toEqual(['test-hz', 'test-sn-cov']);
    const sn = got['test-sn-cov'];
    expect(sn).toMatchObject({ name: 'test-sn-cov', kind: 'distance_modulus' });
    const rows = plainRows('good-sn.csv');
    expect(sn.columns.map((c) => c.name)).toEqual(['z', 'mu', 'sigma']);
    expect(sn.columns[1]).toMatchObject({ unit: 'mag', values: rows.map((r) => r[1]) });
    expect(sn.columns[0].values).toEqual(rows.map((r) => r[0]));
    expect(sn.cov).toEqual(plainMatrix('good-sn-cov.csv'));
    expect(got['test-hz'].cov).toBeUndefined();
  });

  it('leaves out names the group does not have, and never reads another group', async () => {
    expect(await resolveDatasets(t.db, demo, ['no-such', 'test-hz'])).toHaveProperty('test-hz');
    expect(Object.keys(await resolveDatasets(t.db, demo, ['no-such', 'kessler-only']))).toEqual([]);
    expect(Object.keys(await resolveDatasets(t.db, second, ['kessler-only']))).toEqual(['kessler-only']);
  });
});

describe('demo datasets (seeded, synthetic)', () => {
  it('the demo group has the three invented datasets, labelled synthetic in name and description', async () => {
    const list = (await viewer.get(`/api/groups/${demo}/datasets`)).body.datasets as { id: number; name: string; kind: string; rowCount: number; description: string }[];
    const byName = Object.fromEntries(list.map((d) => [d.name, d]));
    expect(byName['aurora-sn-synthetic']).toMatchObject({ kind: 'distance_modulus', rowCount: 500 });
    expect(byName['aurora-hz-synthetic']).toMatchObject({ kind: 'hubble', rowCount: 30 });
    expect(byName['aurora-fs8-synthetic']).toMatchObject({ kind: 'fsigma8', rowCount: 12 });
    for (const d of DEMO_DATASETS) {
      expect(d.name).toMatch(/synthetic/);
      expect(byName[d.name].description).toMatch(/^SYNTHETIC/);
      expect(fixtureText(path.join(EXAMPLE_DATASETS, d.file))).toMatch(/^# .*SYNTHETIC/);
    }
    const sn = (await viewer.get(`/api/datasets/${list.find((d) => d.name === 'aurora-sn-synthetic')!.id}`)).body.dataset;
    const z = sn.rows.map((r: number[]) => r[0]);
    expect(Math.min(...z)).toBeGreaterThanOrEqual(0.02);
    expect(Math.max(...z)).toBeLessThanOrEqual(1.5);
  });

  it('the generator reproduces the committed files byte for byte', () => {
    const made = makeDemoDatasets();
    for (const d of DEMO_DATASETS) expect(made[d.file]).toBe(fixtureText(path.join(EXAMPLE_DATASETS, d.file)));
  });

  it('each table is consistent with its stated fiducial model (χ²/dof within 4σ of 1, astropy/scipy)', () => {
    // For Gaussian noise χ² has mean dof and standard deviation √(2 dof) (common practice).
    const checks: [kind: 'mu' | 'H' | 'fs8', file: string, dof: number][] = [
      ['mu', 'aurora-sn-synthetic.csv', 499],
      ['H', 'aurora-hz-synthetic.csv', 30],
      ['fs8', 'aurora-fs8-synthetic.csv', 12],
    ];
    for (const [kind, file, dof] of checks) {
      const c2 = independentChi2(kind, path.join(EXAMPLE_DATASETS, file), 70, 0.3, { tcmb: 2.7255, sigma8: 0.8 });
      expect(Math.abs(c2 - dof)).toBeLessThan(4 * Math.sqrt(2 * dof));
    }
    // A clearly wrong model is rejected by the same data (so the check above can fail).
    const wrong = independentChi2('mu', path.join(EXAMPLE_DATASETS, 'aurora-sn-synthetic.csv'), 70, 0.6, { tcmb: 2.7255 });
    expect(wrong - 499).toBeGreaterThan(4 * Math.sqrt(2 * 499));
  });
});

describe('scripts read datasets by name (end to end through the sandbox)', () => {
  async function run(source: string) {
    // Free-form scripts in a group need editor (runs route); viewers run saved recipes instead.
    const res = await editor.post('/api/runs').send({ source, language: 'ts', groupId: demo });
    expect(res.status).toBe(201);
    return res.body.run as { status: string; outputs: { kind: string; name?: string; value?: number }[]; error?: { message: string; line?: number } | null };
  }
  const value = (r: Awaited<ReturnType<typeof run>>, name: string) => r.outputs.find((o) => o.kind === 'value' && o.name === name)?.value;

  it("dataset('aurora-sn-synthetic') + chi2(...) matches astropy with the analytic marginalisation", async () => {
    const r = await run(`const d = dataset('aurora-sn-synthetic');
const u = universe({ H0: 70, omegaM: 0.31, Tcmb: 0 });
const c = chi2(u, d);
show.value('chi2', c.chi2);
show.value('n', c.n);
show.value('rows', d.z!.length);
`);
    expect(r.status).toBe('done');
    expect(value(r, 'n')).toBe(500);
    expect(value(r, 'rows')).toBe(500);
    const expected = independentChi2('mu', path.join(EXAMPLE_DATASETS, 'aurora-sn-synthetic.csv'), 70, 0.31);
    expect(Math.abs(value(r, 'chi2')! - expected) / expected).toBeLessThan(1e-6);
  });

  it('an uploaded covariance reaches the likelihood (numpy inverse, same marginalisation)', async () => {
    await upload(editor, demo, 'sn-with-cov', 'distance_modulus', 'good-sn.csv', { covariance: 'good-sn-cov.csv' });
    const r = await run(`const c = chi2(universe({ H0: 70, omegaM: 0.3, Tcmb: 0 }), dataset('sn-with-cov'));
show.value('chi2', c.chi2);
`);
    expect(r.status).toBe('done');
    const expected = independentChi2('mu', path.join(FIX, 'good-sn.csv'), 70, 0.3, { cov: path.join(FIX, 'good-sn-cov.csv') });
    const diagonal = independentChi2('mu', path.join(FIX, 'good-sn.csv'), 70, 0.3);
    expect(Math.abs(expected - diagonal) / expected).toBeGreaterThan(1e-3); // the covariance matters here
    expect(Math.abs(value(r, 'chi2')! - expected) / expected).toBeLessThan(1e-6);
  });

  it('an H(z) dataset reaches its likelihood (astropy H(z))', async () => {
    const r = await run(`const u = universe({ H0: 69, omegaM: 0.29, Tcmb: 0 });
show.value('hz', chi2(u, dataset('aurora-hz-synthetic')).chi2);
`);
    expect(r.status).toBe('done');
    const hz = independentChi2('H', path.join(EXAMPLE_DATASETS, 'aurora-hz-synthetic.csv'), 69, 0.29);
    expect(Math.abs(value(r, 'hz')! - hz) / hz).toBeLessThan(1e-6);
  });

  it('an f·σ8 dataset reaches its likelihood (scipy growth ODE)', async () => {
    const r = await run(`const u = universe({ H0: 69, omegaM: 0.29, Tcmb: 0 });
show.value('fs8', chi2(u, dataset('aurora-fs8-synthetic'), { sigma8: 0.8 }).chi2);
`);
    expect(r.error ?? null).toBeNull();
    expect(r.status).toBe('done');
    const fs8 = independentChi2('fs8', path.join(EXAMPLE_DATASETS, 'aurora-fs8-synthetic.csv'), 69, 0.29, { sigma8: 0.8 });
    expect(Math.abs(value(r, 'fs8')! - fs8) / fs8).toBeLessThan(1e-4);
  });

  it("a name the group does not have (or another group's) stops the run at that line", async () => {
    const r = await run(`const u = universe({ H0: 70, omegaM: 0.3 });
const d = dataset('kessler-only');
`);
    expect(r.status).toBe('error');
    expect(r.error?.message).toMatch(/no dataset named "kessler-only"/);
    expect(r.error?.line).toBe(2);
  });
});
