/**
 * Live comparison with astropy: when Debian's /usr/bin/python3 has astropy and scipy, the committed
 * script tests/reference/make_reference.py draws a fresh random set of models (seed from the clock,
 * printed on failure) and the kernel must agree with it as with the committed file: 1e-7 relative
 * against astropy (age excepted, astropy's own quad is looser at high z), 1e-9 against the tight scipy
 * quadrature of the same integrands. Skipped, with the reason, when astropy is not installed.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { compare, type RefFile } from './reference-compare';

const PY = '/usr/bin/python3';
const probe = spawnSync(PY, ['-c', 'import astropy, scipy; print(astropy.__version__)'], { encoding: 'utf8' });
const available = probe.status === 0;
const reason = available ? '' : `skipped: ${PY} with astropy and scipy is not available (${(probe.error?.message ?? probe.stderr ?? '').trim().split('\n').pop()})`;
if (!available) console.warn(`reference-live.test.ts ${reason}`);

describe.skipIf(!available)(`kernel vs live astropy ${probe.stdout?.trim() ?? ''} on random models`, () => {
  const seed = Date.now() % 100000;
  let ref: RefFile;

  it(`generates a fresh reference set (seed ${seed})`, () => {
    const dir = mkdtempSync(join(tmpdir(), 'comoving-ref-'));
    const out = join(dir, 'live.json');
    const script = fileURLToPath(new URL('../reference/make_reference.py', import.meta.url));
    const r = spawnSync(PY, [script, '--seed', String(seed), '--models', '8', '--out', out], { encoding: 'utf8', timeout: 240_000 });
    expect(r.status, r.stderr).toBe(0);
    ref = JSON.parse(readFileSync(out, 'utf8')) as RefFile;
    rmSync(dir, { recursive: true, force: true });
    expect(ref.models.length).toBe(8);
  }, 250_000);

  it(`agrees with astropy to 1e-7 (seed ${seed})`, () => {
    for (const w of compare(ref, 'astropy').values()) {
      if (w.key === 'age') continue;
      expect(w.err, `${w.key} (${w.model}, z=${w.z}, seed ${seed})`).toBeLessThan(1e-7);
    }
  });

  it(`agrees with the tight scipy quadrature to 1e-9 (seed ${seed})`, () => {
    for (const w of compare(ref, 'quad').values()) {
      expect(w.err, `${w.key} (${w.model}, z=${w.z}, seed ${seed})`).toBeLessThan(1e-9);
    }
  });
});
