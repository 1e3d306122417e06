/**
 * The app shell in a real browser against the real server: sign-in (and its refusal), the group page
 * per role, the group switcher, the admin pages and the datasets page. Expected texts come from the
 * seed (server/db/seed/demoAccounts.ts) and the API contracts in shared/schemas, not from the client.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_EMAILS, DEMO_GROUP, hasChromium, skipReason, startE2E, type E2E } from './helpers';

if (!hasChromium) console.warn(skipReason);

describe.skipIf(!hasChromium)('browser: app shell', () => {
  let e: E2E;

  beforeAll(async () => {
    e = await startE2E();
  }, 240_000);

  afterAll(async () => {
    await e?.close();
  });

  it('a wrong password shows the refusal inside the sign-in form and stays signed out', async () => {
    const { page } = e;
    await e.goto('/sign-in');
    await page.getByLabel('E-mail').fill(DEMO_EMAILS.editor);
    await page.getByLabel('Password', { exact: true }).fill('not-the-password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    const err = page.locator('[data-test="sign-in-form"] [data-test="form-error"]');
    await err.waitFor();
    expect(await err.textContent()).toContain('do not match');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    const me = await page.evaluate(() => fetch('/api/auth/me').then((r) => r.status));
    expect(me).toBe(401);
    await e.screenshot('sign-in-error-light');
  });

  it('an empty form is refused beside each field before anything is sent', async () => {
    const { page } = e;
    await e.goto('/sign-in');
    await page.getByRole('button', { name: 'Sign in' }).click();
    const feedback = page.locator('.n-form-item-feedback__line');
    await feedback.first().waitFor();
    const texts = await feedback.allTextContents();
    expect(texts.some((t) => /e-mail/i.test(t))).toBe(true);
    expect(texts.some((t) => /password/i.test(t))).toBe(true);
  });

  it('signed out, a deep link goes to sign-in and comes back after it', async () => {
    const { page } = e;
    await e.goto('/groups');
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    expect(new URL(page.url()).searchParams.get('redirect')).toBe('/groups');
    await page.getByLabel('E-mail').fill(DEMO_EMAILS.viewer);
    await page.getByLabel('Password', { exact: true }).fill('comoving-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.getByRole('heading', { name: 'Your groups' }).waitFor();
    expect(new URL(page.url()).pathname).toBe('/groups');
    await e.signOut();
  });

  it('the demo editor signs in, switches to the demo group and sees its page without member management', async () => {
    const { page } = e;
    await e.signIn(DEMO_EMAILS.editor);
    expect(new URL(page.url()).pathname).toMatch(/^\/groups\/\d+$/);
    await page.locator('[data-test="group-switcher"]').click();
    await page.locator('.n-dropdown-option', { hasText: DEMO_GROUP }).click();
    await page.locator('[data-test="group-name"]', { hasText: DEMO_GROUP }).waitFor();
    await page.waitForLoadState('networkidle');
    expect(await page.locator('[data-test="group-name"]').textContent()).toBe(DEMO_GROUP);
    // The switcher names the group too, and the members list shows the four demo accounts.
    expect(await page.locator('[data-test="group-switcher"]').textContent()).toContain(DEMO_GROUP);
    for (const email of Object.values(DEMO_EMAILS)) {
      await expect(page.locator(`[data-member="${email}"]`).count()).resolves.toBe(1);
    }
    expect(await page.locator('[data-test="member-role"]').count()).toBe(0);
    expect(await page.locator('[data-test="invite-form"]').count()).toBe(0);
    await e.screenshot('group-editor-light');

    await page.locator('[data-test="theme-toggle"]').click();
    await expect(page.evaluate(() => document.documentElement.dataset.theme)).resolves.toBe('dark');
    await e.screenshot('group-editor-dark');
    await page.locator('[data-test="theme-toggle"]').click();
    await expect(page.evaluate(() => document.documentElement.dataset.theme)).resolves.toBe('light');
  });

  it('the viewer sees the members read-only, no upload form, and no admin pages', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.viewer);
    await page.locator('[data-test="group-name"]', { hasText: DEMO_GROUP }).waitFor();
    await page.locator('[data-test="members"]').waitFor();
    expect(await page.locator('[data-test="members-readonly"]').isVisible()).toBe(true);
    expect(await page.locator('[data-test="member-role"]').count()).toBe(0);
    expect(await page.locator('[data-test="member-remove"]').count()).toBe(0);
    expect(await page.locator('[data-test="member-transfer"]').count()).toBe(0);
    expect(await page.locator('[data-test="invite-form"]').count()).toBe(0);
    await e.screenshot('group-viewer-light');

    await page.getByRole('link', { name: 'Datasets' }).first().click();
    await page.locator('[data-test="datasets-readonly"]').waitFor();
    expect(await page.locator('[data-test="upload-form"]').count()).toBe(0);

    await e.goto('/admin/users');
    expect(new URL(page.url()).pathname).not.toMatch(/^\/admin/);
  });

  it('the owner gets the member-management controls the viewer lacks', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.owner);
    const groups = await page.evaluate(() => fetch('/api/groups').then((r) => r.json() as Promise<{ groups: { id: number; name: string }[] }>));
    const demo = groups.groups.find((g) => g.name === DEMO_GROUP)!;
    await e.goto(`/groups/${demo.id}`);
    await page.locator('[data-test="members"]').waitFor();
    // One role control per non-owner member (editor and viewer at least), and the invitation form.
    expect(await page.locator('[data-test="member-role"]').count()).toBeGreaterThanOrEqual(2);
    expect(await page.locator('[data-test="member-remove"]').count()).toBeGreaterThanOrEqual(2);
    await page.locator('[data-test="invite-form"]').waitFor();
    await e.screenshot('group-owner-light');
  });

  it('the admin tightens the wall time in the form, the next run is stopped by it, and usage shows it', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.admin);
    await e.goto('/admin/limits');
    await page.locator('[data-test="site-limits"]').waitFor();
    const limits = await page.evaluate(() => fetch('/api/admin/limits').then((r) => r.json() as Promise<{ fields: Record<string, { label: string; min: number }> }>));
    for (const [key, f] of Object.entries(limits.fields)) {
      expect(await page.locator(`[data-test="site-limits"] [data-limit="${key}"]`).textContent()).toContain(f.label);
    }
    // Below the range (shared/schemas/limits.ts: wallTimeMs min 100 ms): refused beside the field, nothing saved.
    const wall = page.locator('#limit-wallTimeMs');
    await wall.fill('5');
    await wall.blur();
    await page.locator('[data-test="save-site-limits"]').click();
    const fb = page.locator('[data-limit="wallTimeMs"] [data-test="limit-error"]');
    await fb.waitFor();
    expect(await fb.textContent()).toMatch(/between 100 and/);
    const unchanged = await page.evaluate(() => fetch('/api/admin/limits').then((r) => r.json() as Promise<{ limits: { wallTimeMs: number } }>));
    expect(unchanged.limits.wallTimeMs).not.toBe(5);
    await e.screenshot('admin-limits-light');

    // A valid value is saved through the form and applies to the next run.
    await wall.fill('300');
    await wall.blur();
    await page.locator('[data-test="save-site-limits"]').click();
    await expect
      .poll(() => page.evaluate(() => fetch('/api/admin/limits').then((r) => r.json()).then((b: { limits: { wallTimeMs: number } }) => b.limits.wallTimeMs)))
      .toBe(300);
    const run = await page.evaluate(async (groupName) => {
      const { groups } = (await fetch('/api/groups').then((r) => r.json())) as { groups: { id: number; name: string }[] };
      const groupId = groups.find((g) => g.name === groupName)!.id;
      const body = JSON.stringify({ source: 'while (true) {}', language: 'js', groupId });
      const r = await fetch('/api/runs', { method: 'POST', headers: { 'Content-Type': 'application/json' }, body });
      return (await r.json()) as { run: { status: string; error?: { limit?: string } } };
    }, DEMO_GROUP);
    expect(run.run.status).toBe('limit');
    expect(run.run.error?.limit).toBe('wallTimeMs');

    await e.goto('/admin/usage');
    await page.getByRole('heading', { name: 'By group' }).waitFor();
    const stopped = page.locator('section', { has: page.getByRole('heading', { name: 'Stopped by a limit' }) });
    expect(await stopped.locator('tbody tr').count()).toBeGreaterThanOrEqual(1);
    expect(await stopped.textContent()).toContain('Wall time (wallTimeMs)');
    const byGroup = page.locator('section', { has: page.getByRole('heading', { name: 'By group' }) });
    expect(await byGroup.textContent()).toContain(DEMO_GROUP);
    await e.screenshot('admin-usage-light');

    await e.goto('/admin/users');
    await page.locator('[data-test="admin-users"]').waitFor();
    expect(await page.locator('[data-test="admin-users"] tbody tr').count()).toBeGreaterThanOrEqual(4);
    await e.screenshot('admin-users-light');
  });

  it('the editor uploads a dataset: a bad file is refused at its line and column, a good one opens as table and plot', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.editor);
    const groups = await page.evaluate(() => fetch('/api/groups').then((r) => r.json() as Promise<{ groups: { id: number; name: string }[] }>));
    const demo = groups.groups.find((g) => g.name === DEMO_GROUP)!;
    await e.goto(`/groups/${demo.id}/datasets`);
    await page.locator('[data-test="upload-form"]').waitFor();
    await e.screenshot('datasets-light');

    // Line 3 (the second data row), column 2 holds text where a number belongs.
    await page.getByLabel('Name', { exact: true }).fill('e2e-bad');
    await page.locator('#ds-file').setInputFiles({ name: 'bad.csv', mimeType: 'text/csv', buffer: Buffer.from('z,mu,sigma\n0.1,38.3,0.1\n0.2,abc,0.1\n') });
    await page.locator('[data-test="upload-submit"]').click();
    const where = page.locator('[data-test="upload-where"]');
    await where.waitFor();
    expect(await where.textContent()).toContain('line 3');
    expect(await where.textContent()).toContain('column 2');
    await e.screenshot('datasets-refused-light');
    const after = await page.evaluate((id) => fetch(`/api/groups/${id}/datasets`).then((r) => r.json() as Promise<{ datasets: { name: string }[] }>), demo.id);
    expect(after.datasets.some((d) => d.name === 'e2e-bad')).toBe(false);

    await page.getByLabel('Name', { exact: true }).fill('e2e-good');
    await page.locator('#ds-file').setInputFiles({
      name: 'good.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('z,mu,sigma\n0.1,38.31,0.12\n0.3,41.05,0.15\n0.5,42.27,0.18\n0.8,43.41,0.2\n'),
    });
    await page.locator('[data-test="upload-submit"]').click();
    await page.locator('[data-test="dataset-name"]', { hasText: 'e2e-good' }).waitFor();
    await page.locator('[data-test="dataset-plot"] canvas').first().waitFor();
    const cells = await page.locator('[data-test="dataset-table"] tbody tr').count();
    expect(cells).toBe(4);
    const header = await page.locator('[data-test="dataset-table"] thead').textContent();
    expect(header).toContain('[mag]');
    await page.waitForTimeout(300);
    await e.screenshot('dataset-light');
    await page.locator('[data-test="theme-toggle"]').click();
    await page.waitForTimeout(300);
    await e.screenshot('dataset-dark');
    await page.locator('[data-test="theme-toggle"]').click();

    // cyd edits in both demo groups (seed), so the copy form offers the second group.
    const original = page.url();
    await page.locator('[data-test="copy-open"]').click();
    await page.locator('[data-test="copy-submit"]').click();
    await page.waitForURL((u) => u.href !== original && /\/datasets\/\d+$/.test(u.pathname));
    await page.locator('[data-test="dataset-name"]', { hasText: 'e2e-good' }).waitFor();
    expect(await page.locator('[data-test="group-switcher"]').textContent()).toContain('Kessler Group');
    // The same name again is refused beside the name field (409 name_taken), and nothing is copied.
    await page.goto(original, { waitUntil: 'networkidle' });
    await page.locator('[data-test="copy-open"]').click();
    await page.locator('[data-test="copy-submit"]').click();
    await page.locator('[data-test="copy-form"] .n-form-item-feedback__line', { hasText: 'already has a dataset named' }).waitFor();
    await e.screenshot('dataset-copy-refused-light');
  });

  it('an owner invites by e-mail, the link arrives in the Outbox, and the invitee joins the group through it', async () => {
    const { page } = e;
    const invitee = 'eve@lindqvist-lab.example';
    await e.signOut();
    await e.signIn(DEMO_EMAILS.owner);
    const groups = await page.evaluate(() => fetch('/api/groups').then((r) => r.json() as Promise<{ groups: { id: number; name: string }[] }>));
    const demo = groups.groups.find((g) => g.name === DEMO_GROUP)!;
    await e.goto(`/groups/${demo.id}`);
    await page.getByLabel('E-mail to invite').fill(invitee);
    await page.locator('[data-test="invite-form"]').getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText(`Invitation sent to ${invitee}`).waitFor();

    await e.signOut();
    await e.signIn(DEMO_EMAILS.admin);
    await e.goto('/admin/outbox');
    const first = page.locator('[data-test="outbox-message"]').first();
    await first.waitFor();
    expect(await first.textContent()).toContain(invitee);
    const link = first.locator('a[href*="/invite/"]');
    const href = await link.getAttribute('href');
    expect(href).toMatch(new RegExp(`^${e.baseUrl}/invite/`));
    await e.screenshot('admin-outbox-light');

    await e.signOut();
    await page.goto(href!, { waitUntil: 'networkidle' });
    await page.getByText(DEMO_GROUP).first().waitFor();
    await page.getByLabel('Your name').fill('Eve Nakamura');
    await page.getByLabel('Password', { exact: true }).fill('short');
    await page.getByRole('button', { name: 'Create my account' }).click();
    // shared/schemas/auth.ts NewPassword: at least 10 characters; refused beside the field.
    await page.locator('.n-form-item-feedback__line', { hasText: '10 characters' }).waitFor();
    await e.screenshot('accept-invitation-light');
    await page.getByLabel('Password', { exact: true }).fill('a-long-enough-password');
    await page.getByLabel('Password again').fill('a-long-enough-password');
    await page.getByRole('button', { name: 'Create my account' }).click();
    await page.locator('[data-test="group-name"]', { hasText: DEMO_GROUP }).waitFor();
    expect(await page.locator('[data-test="members-readonly"]').isVisible()).toBe(true);
    expect(await page.locator(`[data-member="${invitee}"]`).count()).toBe(1);
  });

  it('a password reset goes through the Outbox link and the new password signs in', async () => {
    const { page } = e;
    await e.signOut();
    await e.goto('/sign-in');
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    // The sign-in form has an "E-mail" field too: wait until the reset form has replaced it.
    await page.getByRole('heading', { name: 'Reset your password' }).waitFor();
    await page.getByLabel('E-mail').fill(DEMO_EMAILS.viewer);
    await page.getByRole('button', { name: 'Send the link' }).click();
    await page.getByText('a link is on its way').waitFor();

    await e.signIn(DEMO_EMAILS.admin);
    await e.goto('/admin/outbox');
    const first = page.locator('[data-test="outbox-message"]').first();
    await first.waitFor();
    expect(await first.textContent()).toContain(DEMO_EMAILS.viewer);
    const href = await first.locator('a[href*="/reset-password/"]').getAttribute('href');
    expect(href).toBeTruthy();

    await e.signOut();
    await page.goto(href!, { waitUntil: 'networkidle' });
    await page.getByLabel('New password', { exact: true }).fill('dee-new-password-1');
    await page.getByLabel('New password again').fill('dee-new-password-1');
    await page.getByRole('button', { name: 'Set the new password' }).click();
    await page.getByText('Your password is changed').waitFor();
    await page.getByRole('button', { name: 'Continue to your group' }).click();
    await page.locator('[data-test="group-name"]', { hasText: DEMO_GROUP }).waitFor();
    // The old password no longer works; the new one does.
    await e.signOut();
    await e.goto('/sign-in');
    await page.getByLabel('E-mail').fill(DEMO_EMAILS.viewer);
    await page.getByLabel('Password', { exact: true }).fill('comoving-demo');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.locator('[data-test="form-error"]').waitFor();
    await e.signIn(DEMO_EMAILS.viewer, 'dee-new-password-1');
    await page.locator('[data-test="group-name"]', { hasText: DEMO_GROUP }).waitFor();
    await e.goto('/groups');
    await page.getByRole('heading', { name: 'Your groups' }).waitFor();
    await e.screenshot('groups-viewer-light');
  });
});
