// `earmark analyze` end to end: the real binary (bin/earmark.mjs through tsx) on WAV files
// written in a temp dir. Expected values come from the signals' definitions (cited inline).
import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { encodeWav } from '@earmark/dsp';
import { AnalysisReport } from '@earmark/contracts';

const bin = join(dirname(fileURLToPath(import.meta.url)), '../bin/earmark.mjs');
const dir = mkdtempSync(join(tmpdir(), 'earmark-analyze-cli-'));
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
const sine = (n: number, f: number, a: number): Float64Array => Float64Array.from({ length: n }, (_, i) => a * Math.sin((2 * Math.PI * f * i) / FS));

/** Deterministic white-ish noise (LCG), amplitude ±a. */
function noise(n: number, seed: number, a: number): Float64Array {
  let s = seed;
  return Float64Array.from({ length: n }, () => {
    s = (s * 1103515245 + 12345) % 2147483648;
    return a * (2 * (s / 2147483648) - 1);
  });
}

function writeWav(name: string, channels: Float64Array[], options: Parameters<typeof encodeWav>[2] = { encoding: 'float', bitsPerSample: 64 }): string {
  const path = join(dir, name);
  writeFileSync(path, encodeWav(channels, FS, options));
  return path;
}

describe('earmark analyze', () => {
  it('--json prints one report that satisfies the contract, with the measures of a 16-bit −20 dBFS tone', async () => {
    const path = writeWav('tone16.wav', [sine(FS, 997, 0.1), sine(FS, 1500, 0.05)], { encoding: 'pcm-int', bitsPerSample: 16 });
    const run = await earmark('analyze', path, '--json');
    expect(run.code, run.stderr).toBe(0);
    const report = AnalysisReport.parse(JSON.parse(run.stdout));
    expect(report.sampleRate).toBe(FS);
    expect(report.frames).toBe(FS);
    expect(report.channels).toHaveLength(2);
    const [left, right] = report.channels;
    // AES17: amplitude 0.1 → −20 dBFS; 0.05 → −26.02 dBFS (definition of dB)
    expect(Math.abs((left?.rmsDbfs ?? 0) + 20)).toBeLessThan(0.01);
    expect(Math.abs((right?.rmsDbfs ?? 0) + 26.0206)).toBeLessThan(0.01);
    expect(Math.abs((left?.fundamentalHz ?? 0) - 997)).toBeLessThan(1e-4);
    expect(Math.abs((right?.fundamentalHz ?? 0) - 1500)).toBeLessThan(1e-4);
    // 16-bit quantiser at −20 dBFS: 98.09 − 20 + 10·log10(24000/19980) dB (Kester MT-001), ±0.3 dB
    expect(Math.abs((left?.snrDb ?? 0) - (98.09 - 20 + 0.796))).toBeLessThan(0.3);
    expect(left?.energy.relativeError).toBeLessThan(1e-9);
    expect(left?.thirdOctaveBands.find((b) => b.centerHz === 1000)?.levelDbfs).toBeCloseTo(-20, 1);
  });

  it('--reference measures the latency of a delayed copy exactly, and --channel selects one channel', async () => {
    const x = noise(FS, 7, 0.3);
    const delay = 241;
    const y = new Float64Array(FS + 1000);
    y.set(x, delay);
    const ref = writeWav('ref.wav', [x]);
    const cap = writeWav('cap.wav', [y, y]);
    const run = await earmark('analyze', cap, '--reference', ref, '--channel', '1', '--json');
    expect(run.code, run.stderr).toBe(0);
    const report = AnalysisReport.parse(JSON.parse(run.stdout));
    expect(report.channels.map((c) => c.channel)).toEqual([1]);
    const t = report.channels[0]?.transfer;
    expect(t?.method).toBe('h1');
    expect(t?.latencySamples).toBe(delay);
    // A pure delay: group delay = 241/48000 s = 5.0208 ms; |H| = 0 dB; phase exactly linear.
    expect(Math.abs((t?.groupDelayMs.mean ?? 0) - (1000 * delay) / FS)).toBeLessThan(1e-3);
    for (const m of t?.magnitudeDb ?? []) expect(Math.abs(m.db)).toBeLessThan(0.01);
  });

  it('--stimulus with a sweep spec deconvolves; the readable table names each section', async () => {
    const spec = { kind: 'sweep', sampleRate: FS, from: 20, to: 20000, seconds: 1, levelDbfs: -6 };
    writeFileSync(join(dir, 'sweep.json'), JSON.stringify(spec));
    const gen = await earmark('stimulus', '--spec', join(dir, 'sweep.json'), '--bits', 'float32', '-o', join(dir, 'sweep.wav'));
    expect(gen.code, gen.stderr).toBe(0);
    const run = await earmark('analyze', join(dir, 'sweep.wav'), '--stimulus', join(dir, 'sweep.json'), '--json');
    expect(run.code, run.stderr).toBe(0);
    const t = AnalysisReport.parse(JSON.parse(run.stdout)).channels[0]?.transfer;
    expect(t?.method).toBe('deconvolution');
    // Sub-sample latency from the linear impulse response's peak: 0 within 1e-6 samples.
    expect(Math.abs(t?.latencySamples ?? 1)).toBeLessThan(1e-6);
    expect(t?.polarity).toBe('normal');
    // A wire has no harmonic responses: distortion versus frequency reads the method's own floor,
    // below 0.002 % (−94 dB) in every band of a 1 s sweep (measured 0.0012 % at 125 Hz, where the
    // harmonic windows of so short a sweep are shortest; < 0.0002 % above 1 kHz).
    expect(t?.distortionVsFrequency.length).toBeGreaterThan(15); // a 1 s sweep resolves H2/H3 from ~90 Hz up
    for (const d of t?.distortionVsFrequency ?? []) expect(d.thdPercent ?? 0, `${d.centerHz} Hz`).toBeLessThan(d.centerHz >= 1000 ? 2e-4 : 2e-3);
    // float32 storage limits |H| to ~1e-7 relative: 0.001 dB
    for (const m of (t?.magnitudeDb ?? []).filter((b) => b.centerHz >= 31.5 && b.centerHz <= 16000)) expect(Math.abs(m.db)).toBeLessThan(1e-3);
    const table = await earmark('analyze', join(dir, 'sweep.wav'), '--stimulus', join(dir, 'sweep.json'));
    expect(table.code).toBe(0);
    for (const word of ['channel 0', 'level', 'noise floor', '1/3-octave bands', 'transfer (deconvolution)', 'latency', 'polarity normal', 'group delay', 'distortion vs frequency', 'steady part']) expect(table.stdout).toContain(word);
  });

  it('a bad file exits 3 with one clear line on stderr and no stack unless --debug', async () => {
    writeFileSync(join(dir, 'bad.wav'), 'this is not audio');
    const run = await earmark('analyze', join(dir, 'bad.wav'));
    expect(run.code).toBe(3);
    expect(run.stdout).toBe('');
    const lines = run.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^earmark: capture .*bad\.wav is not a readable WAV file/);
    const debug = await earmark('--debug', 'analyze', join(dir, 'bad.wav'));
    expect(debug.code).toBe(3);
    expect(debug.stderr).toMatch(/\n\s+at /);
  });

  it('rejects a missing file, a channel that does not exist and both reference kinds at once: exit 3', async () => {
    const path = writeWav('short.wav', [sine(4800, 1000, 0.5)]);
    for (const args of [['missing.wav'], [path, '--channel', '3'], [path, '--reference', path, '--stimulus', 'x.json']]) {
      const run = await earmark('analyze', ...args);
      expect(run.code).toBe(3);
      expect(run.stderr.trim().split('\n')).toHaveLength(1);
    }
  }, 20_000); // three CLI processes, each starting Node and the engine

  it("a usage error (unknown option) exits 3: commander's line, then the help", async () => {
    const usage = await earmark('analyze', 'any.wav', '--frobnicate');
    expect(usage.code).toBe(3);
    expect(usage.stderr).toMatch(/^error: unknown option '--frobnicate'\n/);
  });
});
