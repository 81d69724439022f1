// `earmark evaluate` end to end: the real binary (bin/earmark.mjs through tsx) on WAV and JSON
// files in a temp dir. Captures are made from the stimulus with @earmark/dsp/testing; expected
// values come from the filters' analytic responses (RBJ Audio EQ Cookbook), cited inline.
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { StimulusSpec } from '@earmark/contracts';
import { encodeWav, generateStimulus } from '@earmark/dsp';
import { applyBiquad, clip, peakingEqCoefficients, scaleDb } from '@earmark/dsp/testing';

const bin = join(dirname(fileURLToPath(import.meta.url)), '../bin/earmark.mjs');
const dir = mkdtempSync(join(tmpdir(), 'earmark-evaluate-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

function earmark(...args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    execFile(process.execPath, [bin, ...args], { cwd: dir, maxBuffer: 16 * 1024 * 1024 }, (error, stdout, stderr) => {
      const code = error === null ? 0 : typeof error.code === 'number' ? error.code : -1;
      resolve({ code, stdout, stderr });
    });
  });
}

const FS = 48000;
const spec = { kind: 'sweep', sampleRate: FS, from: 20, to: 20000, seconds: 1, levelDbfs: -6 } as const;
const sweep = generateStimulus(StimulusSpec.parse(spec)).channels[0] as Float64Array;

function write(name: string, content: string | Uint8Array): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}
const wav = (name: string, x: Float64Array): string => write(name, encodeWav([x], FS, { encoding: 'float', bitsPerSample: 64 }));

const specPath = write('sweep.json', JSON.stringify(spec));
const maskPath = write(
  'mask.json',
  JSON.stringify({
    checks: [
      { id: 'flat', kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 50, db: 1 }, { hz: 16000, db: 1 }], lower: [{ hz: 50, db: -1 }, { hz: 16000, db: -1 }] },
      { id: 'no-clip', kind: 'integrity', metric: 'clipped-samples', max: 0 },
    ],
  }),
);

interface Summary {
  verdict: string;
  engineVersion: string;
  checks: { id: string; kind: string; pass: boolean; measured: number | null; limit: number | null; margin: number | null; unit: string; worstHz: number | null; error: string | null }[];
}

describe('earmark evaluate', () => {
  it('exits 0 with verdict pass for a sweep through a gentle filter, and prints each check', async () => {
    const capture = wav('gentle.wav', applyBiquad(sweep, peakingEqCoefficients(FS, 3000, 0.5, 1)));
    const run = await earmark('evaluate', capture, '--mask', maskPath, '--stimulus', specPath, '--json');
    expect(run.code, run.stderr).toBe(0);
    const summary = JSON.parse(run.stdout) as Summary;
    expect(summary.verdict).toBe('pass');
    expect(summary.engineVersion).toMatch(/^\d+\.\d+\.\d+/);
    expect(summary.checks.map((c) => [c.id, c.kind, c.pass, c.unit])).toEqual([
      ['flat', 'magnitude-envelope', true, 'dB'],
      ['no-clip', 'integrity', true, 'count'],
    ]);
    // Cookbook peakingEQ: +0.5 dB at 3 kHz is the largest excursion, so about 0.5 dB of margin there.
    expect(summary.checks[0]?.margin).toBeGreaterThan(0.45);
    expect(summary.checks[0]?.margin).toBeLessThan(0.6);
  });

  it('exits 1 for a +2 dB bump at 8 kHz, reporting the worst frequency and margin; the table says FAIL', async () => {
    const capture = wav('bump.wav', applyBiquad(sweep, peakingEqCoefficients(FS, 8000, 2, 2)));
    const run = await earmark('evaluate', capture, '--mask', maskPath, '--stimulus', specPath, '--json');
    expect(run.code, run.stderr).toBe(1);
    const flat = (JSON.parse(run.stdout) as Summary).checks[0];
    // |H(8 kHz)| = +2 dB exactly (cookbook), against +1 dB: margin −1 dB (±0.03 for normalisation and ripple).
    expect(Math.abs((flat?.margin ?? 0) + 1)).toBeLessThan(0.03);
    expect(Math.abs((flat?.worstHz ?? 0) / 8000 - 1)).toBeLessThan(0.05);
    const table = await earmark('evaluate', capture, '--mask', maskPath, '--stimulus', specPath);
    expect(table.code).toBe(1);
    expect(table.stdout).toMatch(/verdict FAIL/);
    expect(table.stdout).toMatch(/^flat\s+magnitude-envelope\s+FAIL\s/m);
    // measured, limit, unit, margin (signed, 2 decimals, real minus), its unit, worst frequency (3 significant digits), channel.
    expect(table.stdout).toMatch(/^flat\s+magnitude-envelope\s+FAIL\s+\S+\s+\S+\s+dB\s+\u2212(0\.9[7-9]|1\.0[0-3])\s+dB\s+(7\.[6-9]\d|8(\.[0-4]\d?)?) kHz\s+\d/m);
  });

  it('exits 2 with verdict error when a check needs the stimulus and none is given', async () => {
    const capture = wav('clipped.wav', clip(scaleDb(sweep, 12), 1));
    const run = await earmark('evaluate', capture, '--mask', maskPath, '--json');
    expect(run.code).toBe(2);
    const summary = JSON.parse(run.stdout) as Summary;
    expect(summary.verdict).toBe('error');
    expect(summary.checks[0]?.error).toMatch(/no stimulus/);
    // The clipping check still reports: the capture is clipped.
    expect(summary.checks[1]?.pass).toBe(false);
  });

  it('a mask that breaks the schema exits 3 (bad input, not a verdict) with one stderr line naming the path', async () => {
    const capture = wav('plain.wav', sweep);
    const bad = write('bad-mask.json', JSON.stringify({ checks: [{ id: 'flat', kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 1000, db: 1 }, { hz: 500, db: 1 }] }] }));
    const run = await earmark('evaluate', capture, '--mask', bad);
    expect(run.code).toBe(3);
    expect(run.stdout).toBe('');
    const lines = run.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^earmark: mask .*bad-mask\.json is invalid: checks\.0\.upper\.1\.hz: frequencies must strictly increase/);
  });

  it('bad JSON, a missing capture and a missing --mask exit 3', async () => {
    const capture = wav('plain2.wav', sweep);
    const notJson = write('not-json.json', '{ checks: ');
    const runs = await Promise.all([[capture, '--mask', notJson], [join(dir, 'missing.wav'), '--mask', maskPath], [capture]].map((args) => earmark('evaluate', ...args)));
    for (const run of runs) {
      expect(run.code).toBe(3);
      expect(run.stderr.trim().length).toBeGreaterThan(0);
    }
    expect(runs[0]?.stderr).toMatch(/^earmark: mask .*not-json\.json is not valid JSON/);
    expect(runs[1]?.stderr).toMatch(/^earmark: cannot read capture .*missing\.wav: ENOENT/);
  });
});
