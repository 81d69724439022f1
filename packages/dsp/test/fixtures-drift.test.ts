import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { FIXTURE_DIR, loadFixture } from './helpers/fixtures.js';

const GENERATOR = join(dirname(fileURLToPath(import.meta.url)), '..', 'reference', 'generate_fixtures.py');
const probe = spawnSync('python3', ['-c', 'import numpy, scipy'], { encoding: 'utf8' });
const pythonReady = probe.status === 0;
const skipNote = pythonReady ? '' : ' — SKIPPED: python3 with numpy and scipy is not available on this machine';

/** Walks two parsed JSON values; numbers must agree to 1e-12 relative (same numpy/scipy build gives exact equality). */
function compare(a: unknown, b: unknown, path: string): void {
  if (typeof a === 'number' && typeof b === 'number') {
    if (!(Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b)) || a === b)) expect.fail(`${path}: regenerated ${a} vs committed ${b}`);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    expect(a.length, `${path} length`).toBe(b.length);
    a.forEach((v, i) => compare(v, b[i], `${path}[${i}]`));
    return;
  }
  if (a && b && typeof a === 'object' && typeof b === 'object') {
    const ka = Object.keys(a).filter((k) => k !== 'numpy' && k !== 'scipy').sort();
    const kb = Object.keys(b).filter((k) => k !== 'numpy' && k !== 'scipy').sort();
    expect(ka, `${path} keys`).toEqual(kb);
    for (const k of ka) compare((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
    return;
  }
  expect(a, path).toEqual(b);
}

describe('reference fixtures cannot drift from their generator', () => {
  it.skipIf(!pythonReady)(`regenerating with numpy/scipy reproduces every committed fixture${skipNote}`, () => {
    const out = mkdtempSync(join(tmpdir(), 'earmark-fixtures-'));
    try {
      const run = spawnSync('python3', [GENERATOR, out], { encoding: 'utf8', timeout: 120_000 });
      expect(run.status, run.stderr).toBe(0);
      const committed = readdirSync(FIXTURE_DIR).filter((f) => f.endsWith('.json')).sort();
      expect(readdirSync(out).sort()).toEqual(committed);
      for (const name of committed) compare(loadFixture(name, out), loadFixture(name), name);
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  }, 120_000);
});
