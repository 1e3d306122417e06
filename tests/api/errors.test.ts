import { mkdtempSync, rmSync, writeFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import express from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { createApp } from '../../server/app';
import { errorHandler } from '../../server/http/errors';
import { requestId } from '../../server/http/requestId';
import { DEMO, makeTestApp, TEST_ORIGIN, type TestApp } from '../helpers/testApp';

let t: TestApp;
beforeAll(async () => {
  t = await makeTestApp();
});
afterAll(async () => {
  await t.close();
});

describe('the request frame', () => {
  it('GET /api/health answers ok with a request id', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ status: 'ok' });
    expect(res.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
  });

  it("keeps a caller's sane X-Request-Id and replaces a bad one", async () => {
    const kept = await request(t.app).get('/api/health').set('X-Request-Id', 'trace-1234abcd');
    expect(kept.headers['x-request-id']).toBe('trace-1234abcd');
    const replaced = await request(t.app).get('/api/health').set('X-Request-Id', 'bad id with spaces');
    expect(replaced.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);
  });

  it('sets the helmet headers and no-store on the API', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['content-security-policy']).not.toContain('upgrade-insecure-requests');
    expect(res.headers['cache-control']).toBe('no-store');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });

  it('unknown /api routes get a JSON 404 with a request id, for any method', async () => {
    for (const method of ['get', 'post', 'delete'] as const) {
      const res = await request(t.app)[method]('/api/no-such-thing');
      expect(res.status).toBe(404);
      expect(res.headers['content-type']).toMatch(/json/);
      expect(res.body.error.code).toBe('not_found');
      expect(res.headers['x-request-id']).toBeTruthy();
    }
  });
});

describe('bad bodies', () => {
  it('malformed JSON → 400 invalid_json', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email": "a@b.c", ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_json');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.js|node_modules|SyntaxError/);
  });

  it('a JSON body over 1 MB → 413 body_too_large', async () => {
    const big = JSON.stringify({ email: 'a@b.c', password: 'x'.repeat(1024 * 1024 + 10) });
    const res = await request(t.app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send(big);
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('body_too_large');
  });

  it('a body just under the limit is read (and then validated)', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send(JSON.stringify({ email: 'a@b.example', password: 'x'.repeat(900_000) }));
    expect(res.status).toBe(400);
    expect(res.body.error.field).toBe('password');
  });
});

describe('Origin check', () => {
  it('refuses a state-changing request from another origin with 403 bad_origin', async () => {
    for (const origin of ['http://evil.example', 'null', 'http://127.0.0.1:3001']) {
      const res = await request(t.app).post('/api/auth/sign-in').set('Origin', origin).send({ email: DEMO.owner.email, password: DEMO.owner.password });
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('bad_origin');
      expect(res.headers['set-cookie']).toBeUndefined();
    }
  });

  it('refuses it even with a valid session', async () => {
    const agent = await t.as(DEMO.owner.email);
    const res = await agent.post('/api/groups').set('Origin', 'https://attacker.example').send({ name: 'Hijacked' });
    expect(res.status).toBe(403);
    expect(await t.db('groups').where({ name: 'Hijacked' }).first()).toBeUndefined();
  });

  it('lets through the configured origin, the own host and requests without Origin', async () => {
    const configured = await request(t.app).post('/api/auth/sign-in').set('Origin', TEST_ORIGIN).send({ email: DEMO.owner.email, password: DEMO.owner.password });
    expect(configured.status).toBe(200);
    const own = await request(t.app).post('/api/auth/sign-in').set('Host', 'localhost:5173').set('Origin', 'http://localhost:5173').send({ email: DEMO.owner.email, password: DEMO.owner.password });
    expect(own.status).toBe(200);
    const none = await request(t.app).post('/api/auth/sign-in').send({ email: DEMO.owner.email, password: DEMO.owner.password });
    expect(none.status).toBe(200);
  });

  it('does not block safe methods from elsewhere', async () => {
    const res = await request(t.app).get('/api/health').set('Origin', 'http://evil.example');
    expect(res.status).toBe(200);
  });
});

describe('unexpected errors', () => {
  it('are answered 500 without a stack and logged with the request id', async () => {
    const app = express();
    app.use(requestId({ logRequests: false }));
    app.get('/boom', () => {
      throw new Error('secret detail in /srv/comoving/server/x.ts');
    });
    app.use(errorHandler);
    const spy = vi.spyOn(console, 'error').mockImplementation(() => {});
    try {
      const res = await request(app).get('/boom');
      expect(res.status).toBe(500);
      expect(res.body.error.code).toBe('internal');
      const id = res.headers['x-request-id'] as string;
      expect(res.body.error.message).toContain(id);
      expect(JSON.stringify(res.body)).not.toContain('secret detail');
      expect(JSON.stringify(res.body)).not.toContain('x.ts');
      const logged = spy.mock.calls.map((c) => String(c[0])).join('\n');
      expect(logged).toContain(id);
      expect(logged).toContain('secret detail');
    } finally {
      spy.mockRestore();
    }
  });

  it('a database failure inside a real route gives the same 500 shape', async () => {
    const local = await makeTestApp();
    const spy = vi.spyOn(console, 'error').mockImplementation(() => {});
    try {
      const admin = await local.as(DEMO.admin.email);
      await local.db.schema.dropTable('mail_outbox');
      const res = await admin.get('/api/admin/outbox');
      expect(res.status).toBe(500);
      expect(res.body).toEqual({ error: { code: 'internal', message: expect.stringContaining(res.headers['x-request-id'] as string) } });
      expect(JSON.stringify(res.body)).not.toMatch(/mail_outbox|SQLITE/);
    } finally {
      spy.mockRestore();
      await local.close();
    }
  });
});

describe('serving the built client', () => {
  it('serves static files and index.html for other non-API GETs, JSON 404 for /api', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'comoving-client-'));
    mkdirSync(path.join(dir, 'assets'));
    writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>Comoving shell</title>');
    writeFileSync(path.join(dir, 'assets', 'app.js'), 'console.log(1)');
    try {
      const app = createApp({ ...t.deps, config: { ...t.config, clientDir: dir } });
      const asset = await request(app).get('/assets/app.js');
      expect(asset.status).toBe(200);
      expect(asset.text).toBe('console.log(1)');
      const deep = await request(app).get('/groups/1/notebooks');
      expect(deep.status).toBe(200);
      expect(deep.text).toContain('Comoving shell');
      const api = await request(app).get('/api/nope');
      expect(api.status).toBe(404);
      expect(api.body.error.code).toBe('not_found');
      const post = await request(app).post('/somewhere');
      expect(post.status).toBe(404);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
