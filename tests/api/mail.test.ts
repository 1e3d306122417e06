/**
 * Mail round trips through the real local SMTP receiver: nodemailer speaks SMTP over loopback to
 * smtp-server, mailparser parses the wire message, the outbox stores it; the test reads the link
 * out of the caught text exactly as a person would.
 */
import { createHash } from 'node:crypto';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO, DEMO_GROUP_NAME, makeTestApp, SECOND_GROUP_NAME, type TestApp } from '../helpers/testApp';

let t: TestApp;
beforeEach(async () => {
  t = await makeTestApp();
});
afterEach(async () => {
  await t.close();
});

function tokenFrom(text: string, kind: 'invite' | 'reset-password'): string {
  const m = new RegExp(`${t.config.appOrigin.replace(/[.:/]/g, '\\$&')}/${kind}/([A-Za-z0-9_-]{20,})`).exec(text);
  if (!m) throw new Error(`no ${kind} link in: ${text}`);
  return m[1]!;
}

describe('the mail catcher', () => {
  it('receives a message sent by an outside SMTP client and stores it parsed', async () => {
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port: t.mailCatcher.port, secure: false, ignoreTLS: true });
    await transport.sendMail({ from: 'probe@example.org', to: 'someone@example.org', subject: 'Probe ✓', text: 'Line one\nLine two' });
    transport.close();
    const [m] = await t.mailCatcher.messages();
    expect(m).toMatchObject({ to: 'someone@example.org', from: 'probe@example.org', subject: 'Probe ✓', text: 'Line one\nLine two' });
  });
});

describe('invitation round trip', () => {
  it('invite → caught message → token from the link → accept → signed in as a member of the group', async () => {
    const bo = await t.as(DEMO.owner.email);
    const gid = await t.demoGroupId();
    const inv = await bo.post(`/api/groups/${gid}/invitations`).send({ email: 'Ines.Ortega@example.org', role: 'editor' });
    expect(inv.status).toBe(201);

    const mail = await t.mailCatcher.waitFor((m) => m.to === 'ines.ortega@example.org');
    expect(mail.subject).toBe(`Invitation to ${DEMO_GROUP_NAME} on Comoving`);
    expect(mail.from).toBe('no-reply@comoving.local');
    expect(mail.text).toContain(DEMO.owner.name);
    const token = tokenFrom(mail.text, 'invite');

    // Only the SHA-256 of the token is stored.
    const rows = (await t.db('invitations').select('token_hash')) as { token_hash: string }[];
    expect(rows.map((r) => r.token_hash)).toEqual([createHash('sha256').update(token).digest('hex')]);
    expect(JSON.stringify(await t.db('invitations').select())).not.toContain(token);

    const info = await request(t.app).get(`/api/invitations/${token}`);
    expect(info.status).toBe(200);
    expect(info.body.invitation).toMatchObject({
      email: 'ines.ortega@example.org',
      group: { id: gid, name: DEMO_GROUP_NAME },
      groupRole: 'editor',
      siteRole: 'member',
      invitedBy: DEMO.owner.name,
      existingAccount: false,
    });

    const agent = t.anon();
    const tooShort = await agent.post(`/api/invitations/${token}/accept`).send({ name: 'Ines Ortega', password: 'short' });
    expect(tooShort.status).toBe(400);
    expect(tooShort.body.error.field).toBe('password');
    const noName = await agent.post(`/api/invitations/${token}/accept`).send({ password: 'a-long-enough-password' });
    expect(noName.status).toBe(400);
    expect(noName.body.error.field).toBe('name');

    const accepted = await agent.post(`/api/invitations/${token}/accept`).send({ name: 'Ines Ortega', password: 'a-long-enough-password' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.user).toMatchObject({ email: 'ines.ortega@example.org', name: 'Ines Ortega', role: 'member' });
    const groups = await agent.get('/api/groups');
    expect(groups.body.groups).toEqual([{ id: gid, name: DEMO_GROUP_NAME, role: 'editor' }]);

    // Single use.
    expect((await request(t.app).get(`/api/invitations/${token}`)).status).toBe(404);
    expect((await t.anon().post(`/api/invitations/${token}/accept`).send({ name: 'X', password: 'another-long-password' })).status).toBe(404);

    // The new password signs in.
    const again = await t.anon().post('/api/auth/sign-in').send({ email: 'ines.ortega@example.org', password: 'a-long-enough-password' });
    expect(again.status).toBe(200);
    const actions = (await t.db('audit_log').pluck('action')) as string[];
    expect(actions).toEqual(expect.arrayContaining(['invitation.create', 'user.create', 'invitation.accept']));
  });

  it('an existing account accepts with its current password and joins the group', async () => {
    const bo = await t.as(DEMO.owner.email);
    const gid = await t.secondGroupId();
    expect((await bo.post(`/api/groups/${gid}/invitations`).send({ email: DEMO.viewer.email, role: 'viewer' })).status).toBe(201);
    const token = tokenFrom((await t.mailCatcher.waitFor((m) => m.to === DEMO.viewer.email)).text, 'invite');
    const info = await request(t.app).get(`/api/invitations/${token}`);
    expect(info.body.invitation.existingAccount).toBe(true);
    const wrong = await t.anon().post(`/api/invitations/${token}/accept`).send({ password: 'not-her-password' });
    expect(wrong.status).toBe(401);
    const agent = t.anon();
    const ok = await agent.post(`/api/invitations/${token}/accept`).send({ password: DEMO.viewer.password });
    expect(ok.status).toBe(200);
    const groups = await agent.get('/api/groups');
    expect(groups.body.groups).toContainEqual({ id: gid, name: SECOND_GROUP_NAME, role: 'viewer' });
  });

  it('an expired or replaced invitation link no longer works', async () => {
    const admin = await t.as(DEMO.admin.email);
    await admin.post('/api/admin/invitations').send({ email: 'late@example.org', role: 'member' });
    const first = tokenFrom((await t.mailCatcher.waitFor((m) => m.to === 'late@example.org')).text, 'invite');
    await admin.post('/api/admin/invitations').send({ email: 'late@example.org', role: 'admin' });
    const second = tokenFrom((await t.mailCatcher.waitFor((m) => m.to === 'late@example.org' && !m.text.includes(first))).text, 'invite');
    expect(second).not.toBe(first);
    expect((await request(t.app).get(`/api/invitations/${first}`)).status).toBe(404);
    expect((await request(t.app).get(`/api/invitations/${second}`)).body.invitation.siteRole).toBe('admin');
    await t.db('invitations').update({ expires_at: new Date(Date.now() - 1000).toISOString() });
    expect((await request(t.app).get(`/api/invitations/${second}`)).status).toBe(404);
  });
});

describe('password reset round trip', () => {
  it('request → caught message → token → new password; old sessions and the old password stop working', async () => {
    const oldSession = await t.signIn(DEMO.editor.email);
    const req = await t.anon().post('/api/auth/password-reset/request').send({ email: DEMO.editor.email.toUpperCase() });
    expect(req.status).toBe(202);
    const mail = await t.mailCatcher.waitFor((m) => m.to === DEMO.editor.email);
    expect(mail.subject).toBe('Reset your Comoving password');
    const token = tokenFrom(mail.text, 'reset-password');
    const stored = (await t.db('password_resets').first('token_hash')) as { token_hash: string };
    expect(stored.token_hash).toBe(createHash('sha256').update(token).digest('hex'));

    const agent = t.anon();
    const done = await agent.post('/api/auth/password-reset/complete').send({ token, password: 'brand-new-password-1' });
    expect(done.status).toBe(200);
    expect(done.body.user.email).toBe(DEMO.editor.email);
    expect((await agent.get('/api/auth/me')).status).toBe(200);

    expect((await oldSession.get('/api/auth/me')).status).toBe(401);
    expect((await t.anon().post('/api/auth/sign-in').send({ email: DEMO.editor.email, password: DEMO.editor.password })).status).toBe(401);
    expect((await t.anon().post('/api/auth/sign-in').send({ email: DEMO.editor.email, password: 'brand-new-password-1' })).status).toBe(200);

    const reuse = await t.anon().post('/api/auth/password-reset/complete').send({ token, password: 'yet-another-password' });
    expect(reuse.status).toBe(400);
    expect(reuse.body.error.code).toBe('invalid_token');
  });

  it('an unknown address gets no mail; an expired link is refused', async () => {
    await t.anon().post('/api/auth/password-reset/request').send({ email: 'ghost@nowhere.example' });
    await t.anon().post('/api/auth/password-reset/request').send({ email: DEMO.viewer.email });
    const mail = await t.mailCatcher.waitFor((m) => m.to === DEMO.viewer.email);
    // Both requests are handled in the background; wait until the unknown one is recorded too.
    for (let i = 0; i < 100; i++) {
      if (await t.db('audit_log').where({ action: 'auth.password_reset.request_unknown' }).first()) break;
      await new Promise((r) => setTimeout(r, 20));
    }
    expect(await t.db('audit_log').where({ action: 'auth.password_reset.request_unknown' }).first()).toBeDefined();
    expect((await t.mailCatcher.messages()).map((m) => m.to)).toEqual([DEMO.viewer.email]);

    const token = tokenFrom(mail.text, 'reset-password');
    await t.db('password_resets').update({ expires_at: new Date(Date.now() - 1000).toISOString() });
    const res = await t.anon().post('/api/auth/password-reset/complete').send({ token, password: 'brand-new-password-2' });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_token');
  });

  it('a second request voids the first link', async () => {
    await t.anon().post('/api/auth/password-reset/request').send({ email: DEMO.owner.email });
    const first = tokenFrom((await t.mailCatcher.waitFor((m) => m.to === DEMO.owner.email)).text, 'reset-password');
    await t.anon().post('/api/auth/password-reset/request').send({ email: DEMO.owner.email });
    const second = tokenFrom((await t.mailCatcher.waitFor((m) => m.to === DEMO.owner.email && !m.text.includes(first))).text, 'reset-password');
    expect((await t.anon().post('/api/auth/password-reset/complete').send({ token: first, password: 'brand-new-password-3' })).status).toBe(400);
    expect((await t.anon().post('/api/auth/password-reset/complete').send({ token: second, password: 'brand-new-password-3' })).status).toBe(200);
  });
});
