import jwt from 'jsonwebtoken';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SESSION_COOKIE } from '../../server/auth/session';
import { DEMO, makeTestApp, TEST_ORIGIN, type TestApp } from '../helpers/testApp';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(async () => {
  await t.close();
});

function sessionCookie(res: request.Response): string | undefined {
  const raw = res.headers['set-cookie'] as unknown as string[] | undefined;
  return raw?.find((c) => c.startsWith(`${SESSION_COOKIE}=`));
}

describe('POST /api/auth/sign-in', () => {
  it('signs in a demo account and sets an httpOnly SameSite=Strict cookie with an expiry', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: DEMO.editor.email, password: DEMO.editor.password });
    expect(res.status).toBe(200);
    expect(res.body.user).toMatchObject({ email: DEMO.editor.email, name: DEMO.editor.name, role: 'member' });
    expect(typeof res.body.user.id).toBe('number');
    expect(res.body.user.password_hash).toBeUndefined();
    const cookie = sessionCookie(res);
    expect(cookie).toBeDefined();
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Strict/i);
    expect(cookie).toMatch(/Max-Age=604800/);
    expect(cookie).toMatch(/Expires=/);
    expect(cookie).toMatch(/Path=\//);
  });

  it('matches e-mail case-insensitively', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: '  Ada@Lindqvist-Lab.EXAMPLE ', password: DEMO.admin.password });
    expect(res.status).toBe(200);
    expect(res.body.user.role).toBe('admin');
  });

  it('gives the same 401 for a wrong password and an unknown e-mail', async () => {
    const wrong = await request(t.app).post('/api/auth/sign-in').send({ email: DEMO.owner.email, password: 'not-the-password' });
    const unknown = await request(t.app).post('/api/auth/sign-in').send({ email: 'nobody@nowhere.example', password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body.error.code).toBe('bad_credentials');
    expect(sessionCookie(wrong)).toBeUndefined();
  });

  it('refuses bad input with 400 naming the field', async () => {
    const noEmail = await request(t.app).post('/api/auth/sign-in').send({ password: 'x' });
    expect(noEmail.status).toBe(400);
    expect(noEmail.body.error).toMatchObject({ code: 'invalid_input', field: 'email' });
    const badEmail = await request(t.app).post('/api/auth/sign-in').send({ email: 'not-an-address', password: 'x' });
    expect(badEmail.status).toBe(400);
    expect(badEmail.body.error.field).toBe('email');
    const noPassword = await request(t.app).post('/api/auth/sign-in').send({ email: DEMO.owner.email });
    expect(noPassword.status).toBe(400);
    expect(noPassword.body.error.field).toBe('password');
    const noBody = await request(t.app).post('/api/auth/sign-in');
    expect(noBody.status).toBe(400);
  });

  it('stores argon2id hashes, never the password', async () => {
    const row = (await t.db('users').where({ email: DEMO.viewer.email }).first('password_hash')) as { password_hash: string };
    expect(row.password_hash.startsWith('$argon2id$')).toBe(true);
    expect(row.password_hash).not.toContain(DEMO.viewer.password);
  });

  it('audits successful and failed sign-ins', async () => {
    const actions = (await t.db('audit_log').pluck('action')) as string[];
    expect(actions).toContain('auth.sign_in');
    expect(actions).toContain('auth.sign_in_failed');
  });
});

describe('GET /api/auth/me and POST /api/auth/sign-out', () => {
  it('401 when signed out', async () => {
    const res = await request(t.app).get('/api/auth/me');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBe('unauthorized');
  });

  it('returns the user for a session and forgets it after sign-out', async () => {
    const agent = await t.signIn(DEMO.viewer.email);
    const me = await agent.get('/api/auth/me');
    expect(me.status).toBe(200);
    expect(me.body.user).toMatchObject({ email: DEMO.viewer.email, role: 'member' });
    const out = await agent.post('/api/auth/sign-out');
    expect(out.status).toBe(204);
    const cleared = sessionCookie(out);
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/);
    const after = await agent.get('/api/auth/me');
    expect(after.status).toBe(401);
  });

  it('sign-out while signed out is harmless', async () => {
    const res = await request(t.app).post('/api/auth/sign-out');
    expect(res.status).toBe(204);
  });

  it('rejects a tampered, a foreign-key and an expired token', async () => {
    const user = (await t.db('users').where({ email: DEMO.owner.email }).first('id')) as { id: number };
    const forged = jwt.sign({ sv: 0 }, 'some-other-secret', { subject: String(user.id), expiresIn: 3600 });
    const expired = jwt.sign({ sv: 0, exp: Math.floor(Date.now() / 1000) - 10 }, t.config.jwtSecret, { subject: String(user.id) });
    const valid = jwt.sign({ sv: 0 }, t.config.jwtSecret, { subject: String(user.id), expiresIn: 3600 });
    for (const [token, status] of [[forged, 401], [expired, 401], [valid.slice(0, -2) + 'xx', 401], [valid, 200]] as const) {
      const res = await request(t.app).get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${token}`);
      expect(res.status).toBe(status);
    }
  });
});

describe('password reset and invitation endpoints (input checks; round trips are in mail.test.ts)', () => {
  it('password-reset/request answers 202 for known and unknown addresses alike', async () => {
    const known = await request(t.app).post('/api/auth/password-reset/request').send({ email: DEMO.owner.email });
    const unknown = await request(t.app).post('/api/auth/password-reset/request').send({ email: 'ghost@nowhere.example' });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(known.body).toEqual(unknown.body);
  });

  it('password-reset/request needs an e-mail', async () => {
    const res = await request(t.app).post('/api/auth/password-reset/request').send({ email: 'nope' });
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('email');
  });

  it('password-reset/complete refuses an unknown token and a short password', async () => {
    const bad = await request(t.app).post('/api/auth/password-reset/complete').send({ token: 'x'.repeat(43), password: 'long-enough-password' });
    expect(bad.status).toBe(400);
    expect(bad.body.error).toMatchObject({ code: 'invalid_token', field: 'token' });
    const short = await request(t.app).post('/api/auth/password-reset/complete').send({ token: 'x'.repeat(43), password: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.field).toBe('password');
  });

  it('GET /api/invitations/:token is 404 for an unknown token', async () => {
    const res = await request(t.app).get('/api/invitations/' + 'y'.repeat(43));
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('invalid_token');
  });

  it('POST /api/invitations/:token/accept needs a password and a live token', async () => {
    const noPw = await request(t.app).post('/api/invitations/' + 'y'.repeat(43) + '/accept').send({ name: 'X' });
    expect(noPw.status).toBe(400);
    expect(noPw.body.error.field).toBe('password');
    const dead = await request(t.app).post('/api/invitations/' + 'y'.repeat(43) + '/accept').send({ name: 'X', password: 'long-enough-password' });
    expect(dead.status).toBe(404);
  });
});

describe('disabled accounts', () => {
  it('cannot sign in and lose their session (same 401 as a wrong password)', async () => {
    const local = await makeTestApp();
    try {
      const agent = await local.signIn(DEMO.viewer.email);
      await local.db('users').where({ email: DEMO.viewer.email }).update({ disabled: true });
      expect((await agent.get('/api/auth/me')).status).toBe(401);
      const res = await request(local.app).post('/api/auth/sign-in').send({ email: DEMO.viewer.email, password: DEMO.viewer.password });
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('bad_credentials');
    } finally {
      await local.close();
    }
  });
});

describe('sign-in rate limit', () => {
  it('answers 429 after the configured number of failed attempts, even for the right password', async () => {
    const local = await makeTestApp({ config: { signInRateLimit: { windowMs: 60_000, limit: 3 } } });
    try {
      const ok = await request(local.app).post('/api/auth/sign-in').set('Origin', TEST_ORIGIN).send({ email: DEMO.owner.email, password: DEMO.owner.password });
      expect(ok.status).toBe(200); // successful attempts do not count
      for (let i = 0; i < 3; i++) {
        const res = await request(local.app).post('/api/auth/sign-in').send({ email: DEMO.owner.email, password: 'wrong-' + i });
        expect(res.status).toBe(401);
      }
      const blocked = await request(local.app).post('/api/auth/sign-in').send({ email: DEMO.owner.email, password: 'wrong-again' });
      expect(blocked.status).toBe(429);
      expect(blocked.body.error.code).toBe('rate_limited');
      const evenRight = await request(local.app).post('/api/auth/sign-in').send({ email: DEMO.owner.email, password: DEMO.owner.password });
      expect(evenRight.status).toBe(429);
      expect(evenRight.headers['ratelimit']).toBeDefined();
    } finally {
      await local.close();
    }
  });
});
