/**
 * Datasets in a real browser against the real server (issue 6, item 3): the demo editor uploads the
 * distance-modulus fixture and sees its rows and plot; a file with text in a number column is refused
 * naming the line and column, and nothing is stored; the same name again becomes version 2; the demo
 * viewer reads the list but gets no upload control. Expected numbers, lines and columns are read from
 * the fixture files themselves (tests/api/fixtures/datasets), not from the client or the server.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_EMAILS, DEMO_GROUP, ROOT, hasChromium, skipReason, startE2E, type E2E } from './helpers';

if (!hasChromium) console.warn(skipReason);

const FIXTURES = path.join(ROOT, 'tests/api/fixtures/datasets');
const GOOD = path.join(FIXTURES, 'good-sn.csv');
const BAD = path.join(FIXTURES, 'non-numeric.csv');
const NAME = 'e2e-sn-fixture';

/** Data rows of a CSV fixture: skips `#` comment lines and the header (plain split; the fixtures hold no quotes). */
function fixtureRows(file: string): number[][] {
  const lines = readFileSync(file, 'utf8').split(/\r?\n/).filter((l) => l.trim() && !l.startsWith('#'));
  return lines.slice(1).map((l) => l.split(',').map(Number));
}

/** 1-based file line and column of the first cell that is not a number, counting comment and header lines. */
function firstNonNumeric(file: string): { line: number; column: number; header: string } {
  const lines = readFileSync(file, 'utf8').split(/\r?\n/);
  const headerIdx = lines.findIndex((l) => l.trim() && !l.startsWith('#'));
  const header = lines[headerIdx].split(',');
  for (let i = headerIdx + 1; i < lines.length; i++) {
    if (!lines[i].trim() || lines[i].startsWith('#')) continue;
    const cells = lines[i].split(',');
    const j = cells.findIndex((c) => c.trim() === '' || Number.isNaN(Number(c)));
    if (j >= 0) return { line: i + 1, column: j + 1, header: header[j].trim() };
  }
  throw new Error(`no bad cell in ${file}`);
}

/** Distinct colours drawn on the plot's canvas: an empty chart has one or two, points and bars add more. */
async function canvasColours(page: Page): Promise<number> {
  return page.locator('[data-test="dataset-plot"] canvas').first().evaluate((el) => {
    const c = el as HTMLCanvasElement;
    const ctx = c.getContext('2d');
    if (!ctx) return 0;
    const { data } = ctx.getImageData(0, 0, c.width, c.height);
    const seen = new Set<number>();
    for (let i = 0; i < data.length; i += 16) seen.add((data[i] << 16) | (data[i + 1] << 8) | data[i + 2]);
    return seen.size;
  });
}

async function datasetNames(page: Page, groupId: number): Promise<{ name: string; version: number }[]> {
  const body = await page.evaluate(
    (id) => fetch(`/api/groups/${id}/datasets`).then((r) => r.json() as Promise<{ datasets: { name: string; version: number }[] }>),
    groupId,
  );
  return body.datasets;
}

describe.skipIf(!hasChromium)('browser: datasets upload, preview and refusals', () => {
  let e: E2E;
  let groupId = 0;

  beforeAll(async () => {
    e = await startE2E();
  }, 240_000);

  afterAll(async () => {
    await e?.close();
  }, 90_000);

  it('the editor uploads the distance-modulus fixture and sees its rows and its plot', async () => {
    const { page } = e;
    await e.signIn(DEMO_EMAILS.editor);
    const groups = await page.evaluate(() => fetch('/api/groups').then((r) => r.json() as Promise<{ groups: { id: number; name: string; role: string }[] }>));
    const demo = groups.groups.find((g) => g.name === DEMO_GROUP)!;
    expect(demo.role).toBe('editor');
    groupId = demo.id;
    await e.goto(`/groups/${groupId}/datasets`);
    await page.locator('[data-test="upload-form"]').waitFor();
    await e.screenshot('datasets-editor-light');

    await page.locator('#ds-file').setInputFiles(GOOD);
    await page.getByLabel('Name', { exact: true }).fill(NAME);
    await page.locator('[data-test="upload-submit"]').click();

    await page.locator('[data-test="dataset-name"]', { hasText: NAME }).waitFor();
    expect(new URL(page.url()).pathname).toMatch(new RegExp(`^/groups/${groupId}/datasets/\\d+$`));
    const expected = fixtureRows(GOOD);
    const table = page.locator('[data-test="dataset-table"]');
    const rows = table.locator('tbody tr');
    expect(await rows.count()).toBe(expected.length);
    // Header: the three columns with the units the file gave ("mu [mag]", "sigma [mag]").
    const header = (await table.locator('thead').textContent()) ?? '';
    expect(header.match(/\[mag\]/g)?.length).toBe(2);
    for (let i = 0; i < expected.length; i++) {
      const cells = (await rows.nth(i).locator('td').allTextContents()).map((t) => t.trim());
      // First cell is the row number; the rest are z, μ, σ as in the file.
      expect(cells.slice(1).map((t) => Number(t.replace('−', '-')))).toEqual(expected[i]);
    }
    const align = await rows.first().locator('td').nth(2).evaluate((td) => getComputedStyle(td).textAlign);
    expect(align).toBe('right');

    const canvas = page.locator('[data-test="dataset-plot"] canvas').first();
    await canvas.waitFor();
    await expect.poll(() => canvasColours(page), { timeout: 10_000 }).toBeGreaterThan(4);
    await e.screenshot('dataset-preview-light');
    await page.locator('[data-test="theme-toggle"]').click();
    await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
    await page.waitForTimeout(400);
    await e.screenshot('dataset-preview-dark');
    await page.locator('[data-test="theme-toggle"]').click();
    await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe('light');

    const stored = await datasetNames(page, groupId);
    expect(stored.find((d) => d.name === NAME)?.version).toBe(1);

    // The page's buttons are in the command bar too: opening the copy panel from the keyboard.
    expect(await page.locator('#copy-h').count()).toBe(0);
    await page.keyboard.press('Control+K');
    await page.getByTestId('command-bar-input').fill('Copy this dataset');
    await page.keyboard.press('Enter');
    await page.locator('#copy-h').waitFor();
  }, 90_000);

  it('a file with text in a number column is refused at its line and column, and nothing is stored', async () => {
    const { page } = e;
    const bad = firstNonNumeric(BAD); // line 4, column 2 (mu) in the fixture
    await e.goto(`/groups/${groupId}/datasets`);
    await page.locator('[data-test="upload-form"]').waitFor();
    const before = await datasetNames(page, groupId);

    await page.locator('#ds-file').setInputFiles(BAD);
    await page.getByLabel('Name', { exact: true }).fill('e2e-non-numeric');
    await page.locator('[data-test="upload-submit"]').click();

    const where = page.locator('[data-test="upload-where"]');
    await where.waitFor();
    const text = (await where.textContent()) ?? '';
    expect(text).toContain(`line ${bad.line}`);
    expect(text).toContain(`column ${bad.column}`);
    expect(text).toContain(bad.header);
    // The reason also sits beside the file field itself.
    const fileItem = page.locator('.n-form-item', { has: page.locator('#ds-file') });
    const feedback = fileItem.locator('.n-form-item-feedback--error .n-form-item-feedback__line');
    await feedback.waitFor();
    expect(((await feedback.textContent()) ?? '').length).toBeGreaterThan(5);
    // No raw JSON in what the user reads.
    const shown = (await page.locator('[data-test="upload-form"]').textContent()) ?? '';
    expect(shown).not.toMatch(/[{}]"|"code"|"error"/);
    await e.screenshot('datasets-refused-fixture-light');

    const after = await datasetNames(page, groupId);
    expect(after).toEqual(before);
    expect(after.some((d) => d.name === 'e2e-non-numeric')).toBe(false);
  }, 90_000);

  it('a missing column and a short row are refused too, each named beside the file field', async () => {
    const { page } = e;
    await e.goto(`/groups/${groupId}/datasets`);
    await page.locator('[data-test="upload-form"]').waitFor();
    const before = await datasetNames(page, groupId);
    const fileFeedback = page.locator('.n-form-item', { has: page.locator('#ds-file') }).locator('.n-form-item-feedback--error .n-form-item-feedback__line');

    // Issue 6: distance moduli need the columns z, mu, sigma; this file's header has only z, mu.
    const missingFile = path.join(FIXTURES, 'missing-column.csv');
    const header = readFileSync(missingFile, 'utf8').split(/\r?\n/)[0].split(',');
    const missing = ['z', 'mu', 'sigma'].filter((c) => !header.includes(c));
    expect(missing).toEqual(['sigma']);
    await page.locator('#ds-file').setInputFiles(missingFile);
    await page.getByLabel('Name', { exact: true }).fill('e2e-missing-column');
    await page.locator('[data-test="upload-submit"]').click();
    await expect.poll(async () => ((await fileFeedback.count()) ? await fileFeedback.textContent() : '')).toContain(missing[0]);

    // The line whose cell count differs from the header's.
    const raggedFile = path.join(FIXTURES, 'ragged.csv');
    const lines = readFileSync(raggedFile, 'utf8').split(/\r?\n/);
    const width = lines[0].split(',').length;
    const shortLine = lines.findIndex((l, i) => i > 0 && l.trim() && l.split(',').length !== width) + 1;
    await page.locator('#ds-file').setInputFiles(raggedFile);
    await page.getByLabel('Name', { exact: true }).fill('e2e-ragged');
    await page.locator('[data-test="upload-submit"]').click();
    const where = page.locator('[data-test="upload-where"]');
    await where.waitFor();
    expect(await where.textContent()).toContain(`line ${shortLine}`);
    expect(((await fileFeedback.textContent()) ?? '').toLowerCase()).toContain(`line ${shortLine}`);
    await e.screenshot('datasets-refused-ragged-light');

    expect(await datasetNames(page, groupId)).toEqual(before);
  }, 90_000);

  it('uploading under the same name makes version 2, and the page says so before sending', async () => {
    const { page } = e;
    await e.goto(`/groups/${groupId}/datasets`);
    await page.locator('[data-test="upload-form"]').waitFor();
    await page.getByLabel('Name', { exact: true }).fill(NAME);
    await page.getByText('this upload becomes its next version').waitFor();
    await page.locator('#ds-file').setInputFiles(GOOD);
    await page.locator('[data-test="upload-submit"]').click();
    await page.locator('[data-test="dataset-name"]', { hasText: NAME }).waitFor();
    const stored = await datasetNames(page, groupId);
    expect(stored.find((d) => d.name === NAME)?.version).toBe(2);
  }, 90_000);

  it('the viewer lists the datasets and opens one, but has no upload control', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.viewer);
    await e.goto(`/groups/${groupId}/datasets`);
    await page.locator('[data-test="datasets"]').waitFor();
    await page.locator('[data-test="datasets-readonly"]').waitFor();
    expect(await page.locator('[data-test="upload-form"]').count()).toBe(0);
    expect(await page.locator('[data-test="upload-submit"]').count()).toBe(0);
    expect(await page.locator('input[type="file"]').count()).toBe(0);
    expect(await page.getByRole('button', { name: /Upload/ }).count()).toBe(0);
    await e.screenshot('datasets-viewer-light');

    await page.locator('[data-test="datasets"]').getByRole('link', { name: NAME }).click();
    await page.locator('[data-test="dataset-name"]', { hasText: NAME }).waitFor();
    expect(await page.locator('[data-test="dataset-table"] tbody tr').count()).toBe(fixtureRows(GOOD).length);
    // The server refuses the viewer's upload as well (same role middleware behind the page).
    const status = await page.evaluate(async (id) => {
      const fd = new FormData();
      fd.append('name', 'viewer-try');
      fd.append('kind', 'distance_modulus');
      fd.append('file', new Blob(['z,mu,sigma\n0.1,38.3,0.1\n'], { type: 'text/csv' }), 'v.csv');
      return (await fetch(`/api/groups/${id}/datasets`, { method: 'POST', body: fd })).status;
    }, groupId);
    expect(status).toBe(403);
  }, 90_000);
});
