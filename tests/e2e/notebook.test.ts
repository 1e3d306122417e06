/**
 * The console in a real browser against the real server and sandbox: the demo editor makes a
 * notebook from the command bar, types a luminosity-distance script, runs it with Ctrl Enter, sees
 * the plot and a table whose first value matches an independent quadrature, saves a version and
 * finds it in the side panel; the demo viewer then sees the last results and has the save refused.
 *
 * Reference for the check: for a flat model without radiation (Tcmb: 0),
 *   d_L(z) = (1 + z) (c / H0) ∫_0^z dz' / E(z'),  E(z) = sqrt(Ω_m (1 + z)^3 + 1 − Ω_m)
 * (Hogg 1999, astro-ph/9905116, eqs. 14–16, 21), integrated here by composite Simpson's rule with
 * 2000 intervals, independently of the project's kernel. c = 299 792.458 km/s (SI definition).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_EMAILS, DEMO_GROUP, hasChromium, skipReason, startE2E, type E2E } from './helpers';

if (!hasChromium) console.warn(skipReason);

const C_KM_S = 299_792.458;

function simpson(f: (x: number) => number, a: number, b: number, n = 2000): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += f(a + i * h) * (i % 2 ? 4 : 2);
  return (s * h) / 3;
}

function luminosityDistanceMpc(z: number, H0: number, omegaM: number): number {
  const E = (x: number) => Math.sqrt(omegaM * (1 + x) ** 3 + 1 - omegaM);
  return (1 + z) * (C_KM_S / H0) * simpson((x) => 1 / E(x), 0, z);
}

const SCRIPT = [
  "const u = universe({ H0: 70, omegaM: 0.3, Tcmb: 0 });",
  'const z = linspace(0.1, 2, 20);',
  'const dL = u.luminosityDistance(z);',
  "show.table('dL', [{ name: 'z', values: z }, { name: 'dL', unit: 'Mpc', values: dL }]);",
  "show.plot({ type: 'line', x: z, series: [{ name: 'dL', values: dL }], xLabel: 'z', yLabel: 'd_L [Mpc]' });",
].join(' ');

describe.skipIf(!hasChromium)('browser: notebook console', () => {
  let e: E2E;
  let notebookPath = '';

  beforeAll(async () => {
    // COMOVING_E2E_CLIENT_DIR lets a developer test a build made elsewhere while dist/ is being rebuilt.
    const clientDir = process.env.COMOVING_E2E_CLIENT_DIR;
    e = await startE2E(clientDir ? { config: { clientDir } } : {});
  }, 240_000);

  afterAll(async () => {
    await e?.close();
  });

  it('the editor creates a notebook from the command bar, runs a script with Ctrl Enter and sees the right numbers', async () => {
    const { page } = e;
    await e.signIn(DEMO_EMAILS.editor);
    const groupId = await page.evaluate(async (name) => {
      const r = (await (await fetch('/api/groups')).json()) as { groups: { id: number; name: string }[] };
      return r.groups.find((g) => g.name === name)?.id;
    }, DEMO_GROUP);
    expect(groupId).toBeGreaterThan(0);
    await e.goto(`/groups/${groupId}/notebooks`);

    await page.keyboard.press('Control+k');
    const input = page.getByTestId('command-bar-input');
    await input.waitFor();
    await input.fill('new notebook');
    await page.keyboard.press('Enter');
    // The action asks for the title in the same bar.
    await expect.poll(() => page.locator('.cbar__prompt').textContent()).toContain('Title');
    await input.fill('Luminosity distance check');
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/notebooks\/\d+$/);
    notebookPath = new URL(page.url()).pathname;

    const editor = page.locator('[data-testid="block-0"] .monaco-editor');
    await editor.waitFor({ timeout: 30_000 });
    await editor.click();
    // insertText types the script as one input, so auto-closing brackets and suggestions stay out of it.
    await page.keyboard.insertText(SCRIPT);
    await page.keyboard.press('Control+Enter');

    const table = page.locator('[data-testid="block-0"] [data-testid="output-table"]');
    await table.waitFor({ timeout: 30_000 });
    await page.locator('[data-testid="block-0"] [data-testid="output-plot"] canvas').first().waitFor({ timeout: 30_000 });

    // Header shows the unit; first data row holds z = 0.1 and its distance.
    const header = (await table.locator('thead').textContent()) ?? '';
    expect(header).toContain('Mpc');
    const firstRow = table.locator('tbody tr').first();
    const cells = await firstRow.locator('td').allTextContents();
    expect(Number(cells[0])).toBeCloseTo(0.1, 10);
    const expected = luminosityDistanceMpc(0.1, 70, 0.3); // ≈ 460.5 Mpc
    const shown = Number(cells[1]);
    expect(Math.abs(shown - expected) / expected).toBeLessThan(2e-5);
    // Numbers are right-aligned in the mono face.
    const align = await firstRow.locator('td').nth(1).evaluate((td) => getComputedStyle(td).textAlign);
    expect(align).toBe('right');

    await e.screenshot('notebook-light');
  });

  it('saving makes a version that the side panel lists', async () => {
    const { page } = e;
    await page.keyboard.press('Control+s');
    await page.getByTestId('save-message').locator('input').fill('Luminosity distance table and plot');
    await page.getByTestId('save-confirm').click();
    await page.getByTestId('unsaved').waitFor({ state: 'detached' });
    await page.getByTestId('open-versions').click();
    const list = page.getByTestId('versions-list');
    await list.locator('li', { hasText: 'Luminosity distance table and plot' }).waitFor();
    expect(await list.locator('li').first().textContent()).toContain('v2');
    await e.screenshot('notebook-versions-light');
    await page.keyboard.press('Escape');
  });

  it('the page follows the dark theme (switched from the command bar)', async () => {
    const { page } = e;
    await page.locator('body').click({ position: { x: 5, y: 300 } });
    await page.keyboard.press('Control+k');
    await page.getByTestId('command-bar-input').fill('dark theme');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
    await page.waitForTimeout(400);
    await e.screenshot('notebook-dark');
    const bg = await page.locator('[data-testid="block-0"]').evaluate((el) => getComputedStyle(el).backgroundColor);
    expect(bg).not.toBe('rgb(252, 251, 248)');
  });

  it('the viewer sees the last results on open, and the save is refused', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.viewer);
    await e.goto(notebookPath);
    // Results come from the stored last run, without running again.
    await page.locator('[data-testid="block-0"] [data-testid="output-table"]').waitFor();
    const save = page.getByTestId('save');
    await save.waitFor();
    expect(await save.isDisabled()).toBe(true);
    expect(await page.getByTestId('save-refused-reason').textContent()).toContain('viewer');
    // Trying anyway (Ctrl S) asks the server, which answers 403; the page says so.
    await page.locator('[data-testid="block-0"] .monaco-editor').click();
    await page.keyboard.press('Control+s');
    const refused = page.getByTestId('save-refused');
    await refused.waitFor();
    expect(await refused.textContent()).toContain('403');
    await e.screenshot('notebook-viewer-dark');
  });

  it('a save on a stale version offers reload or keep both; keeping both makes a new notebook', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.editor);
    await e.goto(notebookPath);
    await page.locator('[data-testid="block-0"] .monaco-editor').waitFor();
    // Someone else saves behind this page's back (same API the page uses).
    const id = Number(notebookPath.split('/').pop());
    const status = await page.evaluate(async (nid) => {
      const cur = (await (await fetch(`/api/notebooks/${nid}`)).json()) as { notebook: { blocks: unknown[]; version: number } };
      const r = await fetch(`/api/notebooks/${nid}`, {
        method: 'PUT',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({ blocks: cur.notebook.blocks, baseVersion: cur.notebook.version, message: 'saved elsewhere' }),
      });
      return r.status;
    }, id);
    expect(status).toBe(200);
    await page.locator('[data-testid="block-0"] .monaco-editor').click();
    await page.keyboard.press('End');
    await page.keyboard.insertText(' // my change');
    await page.keyboard.press('Control+s');
    await page.getByTestId('save-confirm').click();
    await page.getByTestId('stale-dialog').waitFor();
    await page.getByRole('button', { name: /Keep both/ }).click();
    await page.waitForURL((u) => u.pathname !== notebookPath && /\/notebooks\/\d+$/.test(u.pathname));
    await expect.poll(() => page.getByTestId('notebook-title').inputValue()).toContain('(my copy)');
    const src = await page.evaluate(async (p) => {
      const nid = Number(p.split('/').pop());
      const r = (await (await fetch(`/api/notebooks/${nid}`)).json()) as { notebook: { blocks: { source: string }[] } };
      return r.notebook.blocks[0].source;
    }, new URL(page.url()).pathname);
    expect(src).toContain('// my change');
  });

  it('a running block can be stopped', async () => {
    const { page } = e;
    await page.getByTestId('add-script').click();
    const last = page.locator('section.block').last();
    await last.locator('.monaco-editor').waitFor();
    await last.locator('.monaco-editor').click();
    await page.keyboard.insertText("print('spinning'); let i = 0; while (true) { i++; }");
    await page.keyboard.press('Control+Enter');
    await last.getByTestId('stop-block').click({ timeout: 10_000 });
    const err = last.getByTestId('output-error');
    await err.waitFor({ timeout: 10_000 });
    expect(await err.textContent()).toContain('Stopped');
    expect(await last.getByTestId('block-status').textContent()).toContain('stopped');
  });
});
