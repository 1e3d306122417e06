/**
 * Recipes and sweeps in a real browser against the real server, sandbox and sweep runner: the demo
 * editor opens the seeded recipe "aurora-sn-chi2", is stopped by an out-of-range input, runs it from
 * the form and sees a χ² that matches an independent computation; then sweeps Ωm × w0 on an 8 × 8
 * grid, watches the progress bar reach the end, sees the contour map with the best point, and
 * downloads the CSV, whose best row matches the page and whose header names the columns.
 *
 * Reference for the χ² checks (independent of the project's kernel): for a flat model with constant
 * dark-energy w0, matter Ωm and radiation Ωr,
 *   E²(z) = Ωm (1+z)³ + Ωr (1+z)⁴ + (1 − Ωm − Ωr) (1+z)^{3(1+w0)},
 *   d_L = (1+z) (c/H0) ∫₀^z dz'/E(z'),  μ = 5 log10(d_L / Mpc) + 25
 * (Hogg 1999, astro-ph/9905116, eqs. 14–16, 21, 25), integrated by composite Simpson's rule; the
 * absolute magnitude is marginalised analytically, χ² = A − B²/C with A = Σ r²/σ², B = Σ r/σ²,
 * C = Σ 1/σ², r = μ_obs − μ (Goliath et al. 2001, A&A 380, 6, eqs. 8–10). Ωr from Tcmb = 2.7255 K
 * (Fixsen 2009) and Neff = 3.046 massless neutrinos: Ωγ = a_rad T⁴ / (c² ρ_crit),
 * Ων = Neff (7/8)(4/11)^{4/3} Ωγ (standard relic-neutrino density; from memory), CODATA 2018 constants.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_EMAILS, DEMO_GROUP, ROOT, hasChromium, skipReason, startE2E, type E2E } from './helpers';

if (!hasChromium) console.warn(skipReason);

const C_KM_S = 299_792.458;
const MPC_M = 3.0856775814913673e22;
const G = 6.6743e-11;
const SIGMA_SB = 5.670374419e-8;
const C_M_S = 299_792_458;

function omegaRadiation(H0: number, Tcmb = 2.7255, Neff = 3.046): number {
  const H0si = (H0 * 1000) / MPC_M;
  const rhoCrit = (3 * H0si * H0si) / (8 * Math.PI * G);
  const aRad = (4 * SIGMA_SB) / C_M_S;
  const og = (aRad * Tcmb ** 4) / (C_M_S * C_M_S) / rhoCrit;
  return og * (1 + Neff * (7 / 8) * (4 / 11) ** (4 / 3));
}

function simpson(f: (x: number) => number, a: number, b: number, n = 400): number {
  const h = (b - a) / n;
  let s = f(a) + f(b);
  for (let i = 1; i < n; i++) s += f(a + i * h) * (i % 2 ? 4 : 2);
  return (s * h) / 3;
}

const SN = (() => {
  const lines = readFileSync(path.join(ROOT, 'examples/datasets/aurora-sn-synthetic.csv'), 'utf8')
    .split(/\r?\n/)
    .filter((l) => l && !l.startsWith('#'));
  return lines.slice(1).map((l) => l.split(',').map(Number) as [number, number, number]);
})();

function chi2Reference(omegaM: number, w0: number, H0 = 70): number {
  const or = omegaRadiation(H0);
  const ode = 1 - omegaM - or;
  const E = (z: number) => Math.sqrt(omegaM * (1 + z) ** 3 + or * (1 + z) ** 4 + ode * (1 + z) ** (3 * (1 + w0)));
  let A = 0;
  let B = 0;
  let C = 0;
  for (const [z, mu, sigma] of SN) {
    const dL = (1 + z) * (C_KM_S / H0) * simpson((x) => 1 / E(x), 0, z);
    const r = mu - (5 * Math.log10(dL) + 25);
    const w = 1 / (sigma * sigma);
    A += r * r * w;
    B += r * w;
    C += w;
  }
  return A - (B * B) / C;
}

const num = (s: string | null) => Number((s ?? '').replace('−', '-').trim());

describe.skipIf(!hasChromium)('browser: recipes and sweeps', () => {
  let e: E2E;
  let groupId = 0;
  let recipePath = '';

  beforeAll(async () => {
    // COMOVING_E2E_CLIENT_DIR lets a developer test a build made elsewhere while dist/ is being rebuilt.
    const clientDir = process.env.COMOVING_E2E_CLIENT_DIR;
    e = await startE2E(clientDir ? { config: { clientDir } } : {});
  }, 240_000);
  afterAll(async () => {
    await e?.close();
  });

  async function theme(mode: 'light' | 'dark') {
    const { page } = e;
    if ((await page.evaluate(() => document.documentElement.dataset.theme)) !== mode) {
      await page.locator('[data-test="theme-toggle"]').click();
      await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe(mode);
    }
  }

  it('the editor runs the χ² recipe from its form and sees the independent χ²', async () => {
    const { page } = e;
    await e.signIn(DEMO_EMAILS.editor);
    groupId = await page.evaluate(async (name) => {
      const r = (await (await fetch('/api/groups')).json()) as { groups: { id: number; name: string }[] };
      return r.groups.find((g) => g.name === name)?.id ?? 0;
    }, DEMO_GROUP);
    expect(groupId).toBeGreaterThan(0);

    await e.goto(`/groups/${groupId}/recipes`);
    const list = page.getByTestId('recipe-list');
    await list.waitFor();
    await e.screenshot('recipes-light');
    await list.getByRole('link', { name: 'aurora-sn-chi2' }).click();
    await page.getByTestId('recipe-name').filter({ hasText: 'aurora-sn-chi2' }).waitFor();
    recipePath = new URL(page.url()).pathname;

    // The form is built from the declarations: label with its range, default prefilled.
    const om = page.getByTestId('param-omegaM');
    await expect.poll(() => om.textContent()).toContain('0.05 … 0.95');
    const omInput = page.getByLabel('Matter density Ωm', { exact: true });
    expect(await omInput.inputValue()).toBe('0.3');

    // Out of range: Run is off and the reason sits next to the field.
    await omInput.fill('1.2');
    await omInput.blur();
    await expect.poll(() => om.textContent()).toContain('at most 0.95');
    expect(await page.getByTestId('run-recipe').isDisabled()).toBe(true);
    await expect.poll(() => page.getByTestId('run-blocked').textContent()).toContain('at most 0.95');

    await omInput.fill('0.32');
    await omInput.blur();
    expect(await page.getByTestId('run-recipe').isDisabled()).toBe(false);
    // Ctrl Enter runs it, as the Run button does.
    await page.keyboard.press('Control+Enter');
    const result = page.getByTestId('recipe-result');
    await result.waitFor({ timeout: 30_000 });
    const chi2Row = result.getByTestId('output-value').filter({ has: page.locator('dt', { hasText: /^chi2$/ }) });
    // The value's title carries the full-precision number behind the six digits shown.
    const shown = num(await chi2Row.locator('.values__num').getAttribute('title'));
    const ref = chi2Reference(0.32, -1);
    expect(Math.abs(shown - ref) / ref).toBeLessThan(1e-3);
    // The same run from the command bar.
    await page.keyboard.press('Control+K');
    await page.getByTestId('command-bar-input').fill('Run this recipe');
    await page.keyboard.press('Enter');
    await expect.poll(() => result.textContent()).toContain('run #2');
    const prov = await page.getByTestId('run-provenance').textContent();
    expect(prov).toContain('omegaM = 0.32');
    expect(prov).toMatch(/[0-9a-f]{64}/);

    await theme('light');
    await e.screenshot('recipe-light');
    await theme('dark');
    await e.screenshot('recipe-dark');
    await theme('light');
  }, 90_000);

  it('sweeps Ωm × w0 on 8 × 8 points, follows the progress, shows the contours and downloads the CSV', async () => {
    const { page } = e;
    await e.goto(recipePath);
    await page.getByTestId('sweep-recipe').click();
    const form = page.getByTestId('sweep-form');
    await form.waitFor();
    await page.getByTestId('sweep-input-omegaM').waitFor();

    const setNum = async (label: string, v: string) => {
      const f = form.getByLabel(label, { exact: true });
      await f.fill(v);
      await f.blur();
    };
    await setNum('omegaM from', '0.2');
    await setNum('omegaM to', '0.4');
    await setNum('omegaM steps', '8');
    await setNum('w0 from', '-1.4');
    await setNum('w0 to', '-0.6');
    await setNum('w0 steps', '8');
    await expect.poll(() => page.getByTestId('sweep-points').textContent()).toContain('64');

    // Above the group's sweep limit the start is refused with the reason.
    const limit = await page.evaluate(async (g) => ((await (await fetch(`/api/groups/${g}/sweep-limit`)).json()) as { sweepPoints: number }).sweepPoints, groupId);
    await setNum('w0 steps', String(Math.ceil(limit / 8) + 1));
    await expect.poll(() => page.getByTestId('sweep-refusal').textContent()).toContain('sweep limit');
    expect(await page.getByTestId('start-sweep').isDisabled()).toBe(true);
    await setNum('w0 steps', '8');
    await expect.poll(() => page.getByTestId('start-sweep').isDisabled()).toBe(false);

    await theme('light');
    await e.screenshot('sweep-form-light');
    await theme('dark');
    await e.screenshot('sweep-form-dark');
    await theme('light');

    await page.getByTestId('start-sweep').click();
    await page.getByTestId('sweep-progress').waitFor();
    await expect.poll(() => page.getByTestId('sweep-status').textContent(), { timeout: 120_000, interval: 500 }).toBe('finished');
    expect(await page.getByTestId('points-done').textContent()).toContain('64 / 64');
    expect(Number(/^(\d+) points\/s$/.exec((await page.getByTestId('sweep-rate').textContent()) ?? '')?.[1])).toBeGreaterThan(0);
    expect(await page.getByRole('progressbar').getAttribute('aria-valuenow')).toBe('100');

    await page.getByTestId('sweep-map').waitFor();
    await page.locator('[data-testid="sweep-map"] canvas').first().waitFor();
    const best = page.getByTestId('best-point');
    await best.waitFor();
    const bestText = (await best.textContent()) ?? '';
    const bm = /omegaM = ([-\d.e]+).*w0 = ([-−\d.e]+).*min = ([-\d.e]+)/.exec(bestText.replace(/\s+/g, ' '));
    expect(bm).not.toBeNull();
    const [bOm, bW0, bChi2] = [num(bm![1]!), num(bm![2]!), num(bm![3]!)];
    // The best point's χ² is the independent χ² at those inputs.
    expect(Math.abs(bChi2 - chi2Reference(bOm, bW0)) / bChi2).toBeLessThan(1e-3);

    expect(await page.getByTestId('download-csv').getAttribute('href')).toMatch(/\/results\?format=csv$/);
    expect(await page.getByTestId('download-json').getAttribute('href')).toMatch(/\/results\?format=json$/);
    // The CSV (here through the command bar): the header names inputs and values; its smallest χ² row is the point marked.
    await page.keyboard.press('Control+K');
    await page.getByTestId('command-bar-input').fill('Download results CSV');
    const [download] = await Promise.all([page.waitForEvent('download'), page.keyboard.press('Enter')]);
    const file = await download.path();
    const csv = readFileSync(file!, 'utf8').split(/\r?\n/).filter(Boolean);
    expect(csv[0]).toBe('omegaM,w0,chi2,points,chi2 per point,status,error');
    expect(csv).toHaveLength(65);
    const rows = csv.slice(1).map((l) => l.split(','));
    expect(rows.every((r) => r[5] === 'done')).toBe(true);
    const minRow = rows.reduce((a, b) => (Number(b[2]) < Number(a[2]) ? b : a));
    expect(Number(minRow[0])).toBeCloseTo(bOm, 4);
    expect(Number(minRow[1])).toBeCloseTo(bW0, 4);
    expect(Number(minRow[2])).toBeCloseTo(bChi2, 2);

    // One-parameter intervals: a row per input, its best value the map's best point, inside its interval.
    for (const [input, bestValue] of [['omegaM', bOm], ['w0', bW0]] as const) {
      const cells = (await page.getByTestId(`profile-${input}`).locator('td').allTextContents()).map((t) => t.trim());
      expect(cells[0]).toBe(input);
      expect(num(cells[1]!)).toBeCloseTo(bestValue, 1);
      const m = /^(?:edge )?([-−\d.]+) … (?:edge )?([-−\d.]+)/.exec(cells[2]!);
      expect(m).not.toBeNull();
      expect(num(m![1]!)).toBeLessThan(bestValue);
      expect(num(m![2]!)).toBeGreaterThan(bestValue);
    }

    await theme('light');
    await e.screenshot('sweep-done-light');
    await theme('dark');
    await e.screenshot('sweep-done-dark');
    await theme('light');

    // From the best point to a single run there: the form arrives filled in, and the run's χ² is the map's.
    const sweepPath = new URL(page.url()).pathname;
    await page.getByTestId('best-run-link').click();
    await page.getByTestId('recipe-name').filter({ hasText: 'aurora-sn-chi2' }).waitFor();
    expect(Number(await page.getByLabel('Matter density Ωm', { exact: true }).inputValue())).toBeCloseTo(bOm, 4);
    await page.keyboard.press('Control+Enter');
    const result = page.getByTestId('recipe-result');
    await result.waitFor({ timeout: 30_000 });
    const chi2Row = result.getByTestId('output-value').filter({ has: page.locator('dt', { hasText: /^chi2$/ }) });
    expect(num(await chi2Row.locator('.values__num').getAttribute('title'))).toBeCloseTo(bChi2, 2);
    await e.goto(sweepPath);
  }, 180_000);

  it('a script sweep over one input plots a line; three inputs give a map with a slice slider', async () => {
    const { page } = e;
    // One input, from the form in script mode: the inputs are read from the pasted script's param().
    await e.goto(`/groups/${groupId}/sweeps`);
    await page.getByTestId('new-sweep').click();
    const form = page.getByTestId('sweep-form');
    await form.getByText('A script', { exact: true }).click();
    await expect.poll(() => form.textContent()).toContain('1 input declared');
    await page.getByTestId('sweep-input-omegaM').waitFor();
    expect(await page.getByTestId('sweep-input-w0').count()).toBe(0);
    await expect.poll(() => page.getByTestId('sweep-points').textContent()).toMatch(/^\s*10\s*points/);
    await page.getByTestId('start-sweep').click();
    await expect.poll(() => page.getByTestId('sweep-status').textContent(), { timeout: 60_000, interval: 500 }).toBe('finished');
    await page.getByTestId('output-plot').waitFor({ timeout: 30_000 }).catch(async (err: unknown) => {
      await e.screenshot('sweep-one-input-failure');
      throw err;
    });
    expect(await page.locator('[data-testid="output-plot"] canvas').count()).toBeGreaterThan(0);

    // Three inputs through the API: χ² = (a − 1)² + ((b − 2)/0.5)² + c, so in the slice at c the
    // minimum is c, at a = 1, b = 2 (analytic).
    const source = [
      "const a = param('a', { default: 1, min: -5, max: 5 });",
      "const b = param('b', { default: 2, min: -5, max: 5, unit: 'Mpc' });",
      "const c = param('c', { default: 0, min: 0, max: 10 });",
      "show.value('chi2', (a - 1) ** 2 + ((b - 2) / 0.5) ** 2 + c);",
    ].join('\n');
    const id = await page.evaluate(
      async ({ g, src }) => {
        const r = await fetch('/api/sweeps', {
          method: 'POST',
          headers: { 'Content-Type': 'application/json' },
          body: JSON.stringify({
            groupId: g,
            title: 'three inputs',
            source: src,
            inputs: { a: { from: -1, to: 3, steps: 5, scale: 'linear' }, b: { from: 1, to: 3, steps: 5, scale: 'linear' }, c: { values: [0, 1, 4] } },
          }),
        });
        return ((await r.json()) as { sweep: { id: number } }).sweep.id;
      },
      { g: groupId, src: source },
    );
    await e.goto(`/groups/${groupId}/sweeps/${id}`);
    await expect.poll(() => page.getByTestId('sweep-status').textContent(), { timeout: 60_000, interval: 500 }).toBe('finished');
    await page.getByTestId('sweep-slice').waitFor();
    await page.getByTestId('sweep-map').waitFor();
    const best = page.getByTestId('best-point');
    const flat = async () => ((await best.textContent()) ?? '').replace(/\s+/g, ' ');
    await expect.poll(flat).toContain('a = 1');
    expect(await flat()).toContain('b = 2');
    expect(await flat()).toMatch(/min = 0\b/);
    await page.locator('[data-testid="sweep-slice"] .n-slider-mark').nth(1).click();
    await expect.poll(flat).toMatch(/min = 1\b/);
    expect(await flat()).toContain('c = 1');
    await e.screenshot('sweep-three-inputs-light');
  }, 150_000);

  it('refusals next to the field, a stale save kept as a copy, versions compared and restored, copy to another group', async () => {
    const { page } = e;
    // A taken name and a declaration without a default are refused next to their fields.
    await e.goto(`/groups/${groupId}/recipes`);
    await page.getByTestId('new-recipe').click();
    const f = page.getByTestId('new-recipe-form');
    await f.getByRole('textbox').first().fill('aurora-sn-chi2');
    await f.getByRole('button', { name: 'Create recipe' }).click();
    await expect.poll(() => f.getByTestId('form-error').textContent()).toMatch(/already has a recipe/);
    await f.getByRole('textbox').first().fill('needs-default');
    await f.locator('.monaco-editor').click();
    await page.keyboard.press('Control+A');
    await page.keyboard.press('Delete');
    await page.keyboard.insertText("const x = param('x', { min: 0 });\nshow.value('x', x);\n");
    await f.getByRole('button', { name: 'Create recipe' }).click();
    await expect.poll(() => f.getByTestId('source-error').textContent()).toMatch(/line 1\b/);
    await e.screenshot('recipe-new-refused-light');
    await page.keyboard.press('Escape');

    // Someone else saves while our edit is open: the page offers reload or keep-mine-as-a-copy.
    await e.goto(recipePath);
    const recipeId = Number(recipePath.split('/').pop());
    await page.getByText('Description', { exact: true }).locator('..').locator('textarea').fill('Edited in the browser.');
    await page.evaluate(async (rid) => {
      const r = (await (await fetch(`/api/recipes/${rid}`)).json()) as { recipe: { source: string; version: number } };
      await fetch(`/api/recipes/${rid}`, {
        method: 'PUT',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({ source: r.recipe.source + '\n// saved elsewhere\n', baseVersion: r.recipe.version, message: 'saved elsewhere' }),
      });
    }, recipeId);
    await page.getByTestId('save-recipe').click();
    await page.getByPlaceholder('e.g. widen the w0 range').fill('my description');
    await page.getByRole('button', { name: /^Save version/ }).last().click();
    await page.getByText('Someone saved in between').waitFor();
    await e.screenshot('recipe-stale-light');
    await page.getByRole('button', { name: 'Keep mine as a copy' }).click();
    await expect.poll(() => page.getByTestId('recipe-name').textContent()).toBe('aurora-sn-chi2-copy');

    // Back on the original: two versions; compare them, then restore the first.
    await e.goto(recipePath);
    const versions = page.getByTestId('recipe-versions');
    await expect.poll(() => versions.locator('li').count()).toBe(2);
    await versions.getByRole('checkbox').nth(0).click();
    await versions.getByRole('checkbox').nth(1).click();
    await page.getByTestId('compare-versions').click();
    await page.locator('.monaco-diff-editor').first().waitFor({ timeout: 20_000 });
    await page.keyboard.press('Escape');
    await page.locator('.monaco-diff-editor').first().waitFor({ state: 'detached' });
    await versions.getByRole('button', { name: 'Restore' }).first().click();
    await page.locator('.n-popconfirm').getByRole('button', { name: 'Confirm' }).click();
    await expect.poll(() => versions.locator('li').count()).toBe(3);
    expect(await versions.locator('li').first().textContent()).toContain('restored from v1');

    // Copy into the other group the editor belongs to.
    await page.getByTestId('copy-recipe').click();
    await page.getByTestId('copy-form').getByRole('button', { name: 'Copy' }).click();
    await page.getByText(/Copied to .* as/).waitFor();
    const there = await page.evaluate(async (g) => {
      const gs = (await (await fetch('/api/groups')).json()) as { groups: { id: number; name: string }[] };
      const other = gs.groups.find((x) => x.id !== g)!;
      const r = (await (await fetch(`/api/groups/${other.id}/recipes`)).json()) as { recipes: { name: string }[] };
      return r.recipes.map((x) => x.name);
    }, groupId);
    expect(there).toContain('aurora-sn-chi2');

    // A viewer reads and runs but cannot save: the source is read-only and says why.
    await e.signOut();
    await e.signIn(DEMO_EMAILS.viewer);
    await e.goto(recipePath);
    await page.getByText('read-only: you are a viewer in this group').waitFor();
    expect(await page.getByTestId('save-recipe').count()).toBe(0);
    await page.getByTestId('run-recipe').click();
    await page.getByTestId('recipe-result').waitFor({ timeout: 30_000 });
  }, 150_000);
});
