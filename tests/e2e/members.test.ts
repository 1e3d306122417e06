/**
 * Members of a group in a real browser against the real server and its real SMTP catcher:
 * the owner invites a new address as viewer from the group page, the admin finds the invitation in
 * the Outbox, the invitee opens its link in a separate browser (no shared cookies), joins as viewer,
 * then the owner makes them editor and removes them — each step checked in the invitee's own browser
 * and through the API. The demo viewer sees no member-management controls; a wrong password is
 * refused inside the sign-in form. Expected roles and names come from the seed
 * (server/db/seed/demoAccounts.ts) and the API contract of issue 2, not from the client code.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CHROMIUM, DEMO_EMAILS, DEMO_GROUP, hasChromium, skipReason, startE2E, type E2E } from './helpers';

if (!hasChromium) console.warn(skipReason);

// Seed (server/db/seed/demoAccounts.ts): bo owns it, cyd is its editor.
const SECOND_GROUP = 'Kessler Group — Early Universe';
const INVITEE = 'fay.okafor@lindqvist-lab.example';
const INVITEE_NAME = 'Fay Okafor';
const INVITEE_PASSWORD = 'fay-joins-the-lab-2026';

interface GroupsBody {
  groups: { id: number; name: string; role: string }[];
}

/** The caller's groups as the API reports them (issue 2: `GET /api/groups` → `{groups:[{id,name,role}]}`). */
async function myGroups(page: Page): Promise<{ status: number; body: GroupsBody | null }> {
  return page.evaluate(async () => {
    const r = await fetch('/api/groups');
    return { status: r.status, body: r.ok ? ((await r.json()) as GroupsBody) : null };
  });
}

describe.skipIf(!hasChromium)('browser: group members, invitations and roles', () => {
  let e: E2E;
  let groupId = 0;
  let inviteHref = '';
  // The invitee's own browser profile: nothing shared with the owner's or admin's session.
  let other: BrowserContext | null = null;
  let otherDir = '';
  let otherPage: Page;

  beforeAll(async () => {
    e = await startE2E();
  }, 240_000);

  afterAll(async () => {
    await other?.close().catch(() => undefined);
    if (otherDir) rmSync(otherDir, { recursive: true, force: true });
    await e?.close();
  }, 90_000);

  it('a wrong password is refused next to the sign-in form, and nobody is signed in', async () => {
    const { page } = e;
    await e.goto('/sign-in');
    await page.getByLabel('E-mail').fill(DEMO_EMAILS.owner);
    await page.getByLabel('Password', { exact: true }).fill('comoving-demo-wrong');
    await page.getByRole('button', { name: 'Sign in' }).click();
    const err = page.locator('[data-test="sign-in-form"] [data-test="form-error"]');
    await err.waitFor();
    expect((await err.textContent())?.trim().length).toBeGreaterThan(10);
    // The refusal sits inside the form, right above the button (not in a toast elsewhere).
    const errBox = (await err.boundingBox())!;
    const btnBox = (await page.getByRole('button', { name: 'Sign in' }).boundingBox())!;
    expect(errBox.y).toBeLessThan(btnBox.y);
    expect(btnBox.y - (errBox.y + errBox.height)).toBeLessThan(60);
    expect(new URL(page.url()).pathname).toBe('/sign-in');
    expect(await page.evaluate(() => fetch('/api/auth/me').then((r) => r.status))).toBe(401);
    await e.screenshot('members-sign-in-refused-light');
  }, 90_000);

  it('the owner invites a new address as viewer from the group page', async () => {
    const { page } = e;
    await e.signIn(DEMO_EMAILS.owner);
    const mine = await myGroups(page);
    const demo = mine.body!.groups.find((g) => g.name === DEMO_GROUP)!;
    expect(demo.role).toBe('owner');
    groupId = demo.id;
    await e.goto(`/groups/${groupId}`);
    const form = page.locator('[data-test="invite-form"]');
    await form.waitFor();
    // From the keyboard: the command bar's action puts the cursor in the invitation's e-mail field.
    await page.keyboard.press('Control+K');
    await page.getByTestId('command-bar-input').fill('Invite a member');
    await page.keyboard.press('Enter');
    await expect.poll(() => page.evaluate(() => document.activeElement?.id)).toBe('invite-member-email');
    await page.keyboard.type(INVITEE);
    expect(await page.getByLabel('E-mail to invite').inputValue()).toBe(INVITEE);
    await form.locator('.n-select').click();
    await page.locator('.n-base-select-option', { hasText: /^viewer/ }).click();
    expect(await form.locator('.n-select').textContent()).toContain('viewer');
    await form.getByRole('button', { name: 'Send invitation' }).click();
    await page.getByText(`Invitation sent to ${INVITEE}`).waitFor();
    await e.screenshot('members-owner-invited-light');
  }, 90_000);

  it('the admin sees the invitation arrive in the Outbox, with its link', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.admin);
    await e.goto('/admin/outbox');
    const msg = page.locator('[data-test="outbox-message"]', { hasText: INVITEE }).first();
    // The message travels through SMTP to the catcher; give the mail path a moment.
    await expect
      .poll(
        async () => {
          if ((await msg.count()) > 0) return true;
          await page.getByRole('button', { name: 'Refresh' }).click();
          await page.waitForLoadState('networkidle');
          return false;
        },
        { timeout: 15_000, interval: 500 },
      )
      .toBe(true);
    if ((await msg.locator('a[href*="/invite/"]').count()) === 0) await msg.locator('button.msg-head').click();
    const link = msg.locator('a[href*="/invite/"]');
    await link.waitFor();
    inviteHref = (await link.getAttribute('href')) ?? '';
    expect(inviteHref).toMatch(new RegExp(`^${e.baseUrl}/invite/[A-Za-z0-9_-]{20,}$`));
    // The body names the group and the role the owner chose.
    expect(await msg.textContent()).toContain(DEMO_GROUP);
    expect(await msg.textContent()).toMatch(/viewer/);
    await e.screenshot('members-outbox-light');
    // Same message as the API lists it (issue 2: GET /api/admin/outbox).
    const api = await page.evaluate(() => fetch('/api/admin/outbox').then((r) => r.json() as Promise<{ messages: { to: string; text: string }[] }>));
    expect(api.messages.some((m) => m.to.includes(INVITEE) && m.text.includes(inviteHref))).toBe(true);
  }, 90_000);

  it('in a fresh browser the invitee opens the link, sets name and password, and lands signed in as viewer', async () => {
    otherDir = mkdtempSync(path.join(os.tmpdir(), 'comoving-e2e-invitee-'));
    other = await chromium.launchPersistentContext(otherDir, {
      executablePath: CHROMIUM,
      headless: true,
      viewport: { width: 1280, height: 860 },
      args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    other.setDefaultTimeout(15_000);
    otherPage = other.pages()[0] ?? (await other.newPage());
    // Nobody is signed in there.
    await otherPage.goto(e.baseUrl + '/sign-in', { waitUntil: 'networkidle' });
    expect(await otherPage.evaluate(() => fetch('/api/auth/me').then((r) => r.status))).toBe(401);

    await otherPage.goto(inviteHref, { waitUntil: 'networkidle' });
    await otherPage.getByText(DEMO_GROUP).first().waitFor();
    expect(await otherPage.getByLabel('E-mail').inputValue()).toBe(INVITEE);
    await otherPage.getByLabel('Your name').fill(INVITEE_NAME);
    await otherPage.getByLabel('Password', { exact: true }).fill(INVITEE_PASSWORD);
    await otherPage.getByLabel('Password again').fill(INVITEE_PASSWORD);
    await e.screenshot('members-accept-invitation-light', otherPage);
    await otherPage.getByRole('button', { name: 'Create my account' }).click();

    await otherPage.locator('[data-test="group-name"]', { hasText: DEMO_GROUP }).waitFor();
    const me = await otherPage.evaluate(() => fetch('/api/auth/me').then((r) => r.json() as Promise<{ user: { email: string; name: string; role: string } }>));
    expect(me.user).toMatchObject({ email: INVITEE, name: INVITEE_NAME, role: 'member' });
    const mine = await myGroups(otherPage);
    expect(mine.body!.groups).toEqual([expect.objectContaining({ id: groupId, name: DEMO_GROUP, role: 'viewer' })]);
    // What a viewer sees: the read-only note, no role selects, no invitation form.
    await otherPage.locator('[data-test="members-readonly"]').waitFor();
    expect(await otherPage.locator('[data-test="member-role"]').count()).toBe(0);
    expect(await otherPage.locator('[data-test="invite-form"]').count()).toBe(0);
    expect(await otherPage.locator('.page-head .role-tag').textContent()).toBe('viewer');
    await e.screenshot('members-invitee-viewer-light', otherPage);

    // The link is single use (issue 2): opening it again is refused with a readable message.
    const again = await other.newPage();
    await again.goto(inviteHref, { waitUntil: 'networkidle' });
    await again.getByText('not valid any more').waitFor();
    await again.close();
  }, 90_000);

  it('back as the owner: the new member shows as viewer, becomes editor, then is removed', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.owner);
    await e.goto(`/groups/${groupId}`);
    const row = page.locator(`[data-member="${INVITEE}"]`);
    await row.waitFor();
    expect(await row.textContent()).toContain(INVITEE_NAME);
    const select = row.locator('[data-test="member-role"]');
    expect(await select.textContent()).toContain('viewer');

    await select.click();
    await page.locator('.n-base-select-option', { hasText: /^editor$/ }).click();
    await page.getByText(`${INVITEE_NAME} is now editor`).waitFor();
    await expect.poll(async () => (await myGroups(otherPage)).body?.groups[0]?.role).toBe('editor');
    // The member's own page follows after a reload: now an editor, still without member management.
    await otherPage.reload({ waitUntil: 'networkidle' });
    await otherPage.locator('.page-head .role-tag', { hasText: 'editor' }).waitFor();
    expect(await otherPage.locator('[data-test="member-role"]').count()).toBe(0);
    await e.screenshot('members-owner-role-changed-light');

    await row.locator('[data-test="member-remove"]').click();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    expect(await dialog.textContent()).toContain(INVITEE);
    await e.screenshot('members-owner-remove-dialog-light');
    await dialog.getByRole('button', { name: 'Remove from group' }).click();
    await page.getByText(`${INVITEE_NAME} was removed`).waitFor();
    await row.waitFor({ state: 'detached' });
    // The removed member's browser: no groups left, and the group page is refused.
    const after = await myGroups(otherPage);
    expect(after.body!.groups).toEqual([]);
    const status = await otherPage.evaluate((id) => fetch(`/api/groups/${id}`).then((r) => r.status), groupId);
    expect([403, 404]).toContain(status);
    await otherPage.goto(`${e.baseUrl}/groups/${groupId}`, { waitUntil: 'networkidle' });
    expect(await otherPage.locator('[data-test="members"]').count()).toBe(0);
    await e.screenshot('members-removed-member-view-light', otherPage);
  }, 90_000);

  it('the demo viewer sees the members but no member-management control', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.viewer);
    await e.goto(`/groups/${groupId}`);
    await page.locator('[data-test="members"]').waitFor();
    for (const email of Object.values(DEMO_EMAILS)) expect(await page.locator(`[data-member="${email}"]`).count()).toBe(1);
    expect(await page.locator('[data-test="members-readonly"]').isVisible()).toBe(true);
    for (const hook of ['member-role', 'member-remove', 'member-transfer', 'invite-form']) {
      expect(await page.locator(`[data-test="${hook}"]`).count(), hook).toBe(0);
    }
    expect(await page.getByRole('button', { name: /Remove|Make owner|Send invitation/ }).count()).toBe(0);
    // And the API refuses the viewer's invitation too (same role middleware behind the page).
    const status = await page.evaluate(async (id) => {
      const r = await fetch(`/api/groups/${id}/invitations`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({ email: 'nobody@lindqvist-lab.example', role: 'viewer' }),
      });
      return r.status;
    }, groupId);
    expect(status).toBe(403);
    await e.screenshot('members-viewer-light');
    await page.locator('[data-test="theme-toggle"]').click();
    await expect.poll(() => page.evaluate(() => document.documentElement.dataset.theme)).toBe('dark');
    await e.screenshot('members-viewer-dark');
    await page.locator('[data-test="theme-toggle"]').click();
  }, 90_000);

  it('the owner hands a group over: the new owner gets the controls, the old one becomes editor without them', async () => {
    const { page } = e;
    await e.signOut();
    await e.signIn(DEMO_EMAILS.owner);
    const kessler = (await myGroups(page)).body!.groups.find((g) => g.name === SECOND_GROUP)!;
    expect(kessler.role).toBe('owner');
    await e.goto(`/groups/${kessler.id}`);
    const row = page.locator(`[data-member="${DEMO_EMAILS.editor}"]`);
    await row.locator('[data-test="member-transfer"]').click();
    const dialog = page.getByRole('dialog');
    await dialog.waitFor();
    await dialog.getByRole('button', { name: 'Transfer ownership' }).click();
    await page.getByText('owns the group now').waitFor();
    await page.locator('.page-head .role-tag', { hasText: 'editor' }).waitFor();
    expect(await page.locator('[data-test="member-role"]').count()).toBe(0);
    expect(await page.locator('[data-test="invite-form"]').count()).toBe(0);
    expect((await myGroups(page)).body!.groups.find((g) => g.id === kessler.id)?.role).toBe('editor');
    await e.screenshot('members-after-transfer-old-owner-light');

    await e.signOut();
    await e.signIn(DEMO_EMAILS.editor);
    await e.goto(`/groups/${kessler.id}`);
    await page.locator('[data-test="invite-form"]').waitFor();
    expect(await page.locator('.page-head .role-tag').textContent()).toBe('owner');
    expect(await page.locator(`[data-member="${DEMO_EMAILS.owner}"] [data-test="member-role"]`).count()).toBe(1);
  }, 90_000);
});
