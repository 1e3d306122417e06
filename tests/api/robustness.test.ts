/**
 * Bad input anywhere gets a clear 4xx, never a 500: every state-changing route and a few queries are
 * sent malformed JSON and bodies of the wrong shape (common practice: a crude fuzz of the API surface).
 */
import { expect, it } from 'vitest';
import { DEMO, makeTestApp } from '../helpers/testApp';

it('answers odd bodies and queries with a 4xx and an error message, never a 500', async () => {
  const t = await makeTestApp();
  try {
    const agent = await t.as(DEMO.editor.email);
    const g = await t.demoGroupId();
    const bodies: (object | 'broken-json')[] = [
      [], 'broken-json', [42], { groupId: g }, { groupId: g, source: 1 }, { groupId: g, inputs: null },
      { blocks: 'x' }, { blocks: [{}] }, { inputs: { a: 'x' } }, { source: {} }, { email: [] }, { version: 'x' }, { groupId: -1 },
    ];
    const routes: ['post' | 'put' | 'patch' | 'get', string][] = [
      ['post', '/api/sweeps'], ['post', '/api/runs'], ['put', '/api/notebooks/1'], ['post', '/api/notebooks/1/restore'],
      ['post', '/api/notebooks/1/copy'], ['post', `/api/groups/${g}/notebooks`], ['post', `/api/groups/${g}/recipes`],
      ['put', '/api/recipes/1'], ['post', '/api/recipes/1/run'], ['post', '/api/recipes/1/copy'], ['post', '/api/datasets/1/copy'],
      ['post', `/api/groups/${g}/invitations`], ['patch', `/api/groups/${g}/members/2`], ['post', '/api/sweeps/declarations'],
      ['post', '/api/sweeps/1/cancel'], ['post', '/api/auth/sign-in'], ['post', '/api/auth/password-reset/request'],
      ['get', '/api/runs?page=x'], ['get', `/api/groups/${g}/notebooks?sort=zzz`], ['get', '/api/sweeps/abc'],
      ['get', '/api/sweeps/1/results?format=xml'],
    ];
    const bad: string[] = [];
    for (const [method, path] of routes) {
      for (const body of bodies) {
        const req = agent[method](path);
        const res = body === 'broken-json' ? await req.set('Content-Type', 'application/json').send('{"x":') : await req.send(body);
        const clear = res.status >= 400 && res.status < 500 && typeof res.body?.error?.message === 'string';
        if (res.status >= 500 || (res.status >= 400 && !clear)) bad.push(`${method} ${path} ${JSON.stringify(body)} → ${res.status} ${res.text.slice(0, 120)}`);
      }
    }
    expect(bad).toEqual([]);
  } finally {
    await t.close();
  }
}, 120_000);
