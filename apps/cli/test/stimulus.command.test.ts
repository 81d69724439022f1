// `earmark stimulus` end to end: the real binary (bin/earmark.mjs through tsx) in a temp dir.
// What it writes is checked by decoding it and comparing with the engine's own generator.
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeWav, generateStimulus, sweepInverseFilter } from '@earmark/dsp';
import { StimulusSpec } from '@earmark/contracts';

const bin = join(dirname(fileURLToPath(import.meta.url)), '../bin/earmark.mjs');
const dir = mkdtempSync(join(tmpdir(), 'earmark-stimulus-cli-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Run {
  code: number;
  stdout: string;
  stderr: string;
}

function earmark(...args: string[]): Promise<Run> {
  return new Promise((resolve) => {
    execFile(process.execPath, [bin, ...args], { cwd: dir }, (error, stdout, stderr) => {
      const code = error === null ? 0 : typeof error.code === 'number' ? error.code : -1;
      resolve({ code, stdout, stderr });
    });
  });
}

// Each run starts node + tsx (about 1 s; more on a busy machine), hence the generous timeout.
describe.concurrent('earmark stimulus', { timeout: 30_000 }, () => {
  it('writes the sweep from the brief as 24-bit PCM within ½ LSB of generateStimulus', async () => {
    const r = await earmark('stimulus', '--kind', 'sweep', '--from', '20', '--to', '20000', '--seconds', '5', '--rate', '48000', '--level', '-12', '-o', 'sweep.wav');
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^earmark: wrote sweep\.wav: sweep 20 Hz–20 kHz over 5 s, 48000 Hz, 1 ch, 24-bit PCM, -12 dBFS \(peak -12\.0 dBFS\), 240000 frames$/);
    expect(lines[1]).toMatch(/caution: .*damage hearing and drivers.*low playback level/);
    const decoded = decodeWav(new Uint8Array(readFileSync(join(dir, 'sweep.wav'))));
    expect(decoded.sampleRate).toBe(48000);
    expect(decoded.format).toMatchObject({ encoding: 'pcm-int', bitsPerSample: 24 });
    const want = generateStimulus(StimulusSpec.parse({ kind: 'sweep', sampleRate: 48000, from: 20, to: 20000, seconds: 5, levelDbfs: -12 })).channels[0];
    const got = decoded.channels[0] ?? new Float64Array();
    expect(got.length).toBe(240000);
    let worst = 0;
    got.forEach((v, i) => (worst = Math.max(worst, Math.abs(v - (want?.[i] ?? NaN)))));
    expect(worst).toBeLessThanOrEqual(2 ** -24); // ½ LSB of 24-bit
  });

  it('reads a --spec file, lets flags override it, and writes float32 exactly', async () => {
    writeFileSync(join(dir, 'pink.json'), JSON.stringify({ kind: 'pink-noise', sampleRate: 44100, seconds: 0.25, levelDbfs: -30, seed: 4, channels: 2 }));
    const r = await earmark('stimulus', '--spec', 'pink.json', '--seed', '9', '--bits', 'float32', '-o', 'pink.wav');
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/pink noise \(seed 9\), 0\.25 s, 44100 Hz, 2 ch, 32-bit float, -30 dBFS/);
    const decoded = decodeWav(new Uint8Array(readFileSync(join(dir, 'pink.wav'))));
    const want = generateStimulus(StimulusSpec.parse({ kind: 'pink-noise', sampleRate: 44100, seconds: 0.25, levelDbfs: -30, seed: 9, channels: 2 }));
    expect(decoded.channels).toHaveLength(2);
    expect(Array.from(decoded.channels[1] ?? [])).toEqual(Array.from(want.channels[1] ?? [], (v) => Math.fround(v)));
  });

  it('writes multitone, impulse, sine and silence with their flags', async () => {
    const runs = await Promise.all([
      earmark('stimulus', '--kind', 'multitone', '--frequencies', '100,1000,5000', '--seconds', '0.1', '--level', '-20', '--bits', '16', '-o', 'm.wav'),
      earmark('stimulus', '--kind', 'impulse', '--delay', '10', '--seconds', '0.01', '--level', '-6', '--channels', '3', '-o', 'i.wav'),
      earmark('stimulus', '--kind', 'sine', '--frequency', '997', '--seconds', '0.2', '--fade-in', '0.01', '--fade-out', '0.01', '-o', 's.wav'),
      earmark('stimulus', '--kind', 'silence', '--seconds', '0.05', '--rate', '96000', '-o', 'z.wav'),
    ]);
    for (const r of runs) expect(r.code, r.stderr).toBe(0);
    const impulse = decodeWav(new Uint8Array(readFileSync(join(dir, 'i.wav'))));
    expect(impulse.channels).toHaveLength(3);
    expect(impulse.format.extensible).toBe(true);
    expect(impulse.channels[2]?.[10]).toBeCloseTo(10 ** (-6 / 20), 6);
    expect(runs[0]?.stderr).toMatch(/multitone of 3 tone\(s\) \(schroeder phases\)/);
    expect(runs[3]?.stderr).toMatch(/silence, 0\.05 s, 96000 Hz.*peak -inf dBFS/);
  });

  it('writes the SMPTE and twin-tone IMD signals with --low, --high and --ratio', async () => {
    const [smpte, twin] = await Promise.all([
      earmark('stimulus', '--kind', 'imd-smpte', '--low', '250', '--high', '8000', '--ratio', '4', '--seconds', '0.1', '--level', '-6', '--bits', 'float64', '-o', 'smpte.wav'),
      earmark('stimulus', '--kind', 'imd-twin-tone', '--seconds', '0.1', '--rate', '44100', '-o', 'twin.wav'),
    ]);
    expect(smpte.code, smpte.stderr).toBe(0);
    expect(twin.code, twin.stderr).toBe(0);
    expect(smpte.stderr).toMatch(/SMPTE IMD 250 Hz \+ 8 kHz \(4:1\), 0\.1 s, 48000 Hz/);
    expect(twin.stderr).toMatch(/twin tone 18 kHz \+ 19 kHz, 0\.1 s, 44100 Hz/);
    const decoded = decodeWav(new Uint8Array(readFileSync(join(dir, 'smpte.wav'))));
    const want = generateStimulus(StimulusSpec.parse({ kind: 'imd-smpte', sampleRate: 48000, lowFrequency: 250, highFrequency: 8000, ratio: 4, seconds: 0.1, levelDbfs: -6 })).channels[0];
    expect(Array.from(decoded.channels[0] ?? [])).toEqual(Array.from(want ?? []));
  });

  it('writes the sweep inverse filter with --inverse', async () => {
    const r = await earmark('stimulus', '--kind', 'sweep', '--from', '50', '--to', '5000', '--seconds', '0.5', '--rate', '16000', '--silence', '0.1', '-o', 's2.wav', '--inverse', 'inv.wav');
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/wrote inv\.wav: inverse filter, 8000 taps, 32-bit float, unit gain at 500 Hz/);
    const inv = decodeWav(new Uint8Array(readFileSync(join(dir, 'inv.wav'))));
    const want = sweepInverseFilter(StimulusSpec.parse({ kind: 'sweep', sampleRate: 16000, from: 50, to: 5000, seconds: 0.5, silenceSeconds: 0.1 }) as Extract<StimulusSpec, { kind: 'sweep' }>);
    expect(Array.from(inv.channels[0] ?? [])).toEqual(Array.from(want, (v) => Math.fround(v)));
  });

  it('exits 3 with one line naming the field for a bad spec, without a stack trace', async () => {
    const r = await earmark('stimulus', '--kind', 'sine', '--frequency', '30000', '--seconds', '1', '-o', 'bad.wav');
    expect(r.code).toBe(3);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^earmark: invalid stimulus spec: frequency: frequency must be below half the sample rate/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it('prints the stack trace of a bad spec with --debug', async () => {
    const r = await earmark('--debug', 'stimulus', '--kind', 'sine', '--frequency', 'abc', '--seconds', '1', '-o', 'bad.wav');
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/^earmark: invalid stimulus spec: frequency: Invalid input: expected number, received NaN/);
    expect(r.stderr).toMatch(/\n\s+at /);
  });

  it('refuses levels above 0 dBFS, clipping noise, unknown spec keys and bad --bits with exit 3', async () => {
    writeFileSync(join(dir, 'typo.json'), JSON.stringify({ kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 1000, levle: -3 }));
    const [loud, clip, typo, bits, none] = await Promise.all([
      earmark('stimulus', '--kind', 'sine', '--frequency', '1000', '--seconds', '1', '--level', '3', '-o', 'x.wav'),
      earmark('stimulus', '--kind', 'white-noise', '--seconds', '0.5', '--level', '0', '-o', 'x.wav'),
      earmark('stimulus', '--spec', 'typo.json', '-o', 'x.wav'),
      earmark('stimulus', '--kind', 'silence', '--seconds', '1', '--bits', '20', '-o', 'x.wav'),
      earmark('stimulus', '-o', 'x.wav'),
    ]);
    for (const r of [loud, clip, typo, bits, none]) {
      expect(r?.code).toBe(3);
      expect(r?.stderr.trim().split('\n')).toHaveLength(1);
    }
    expect(loud?.stderr).toMatch(/levelDbfs: levels above 0 dBFS are refused/);
    expect(clip?.stderr).toMatch(/would clip; set levelDbfs to -\d/);
    expect(typo?.stderr).toMatch(/Unrecognized key: "levle"/);
    expect(bits?.stderr).toMatch(/--bits must be one of 16, 24, 32, float32, float64/);
    expect(none?.stderr).toMatch(/give --kind/);
  });

  it('exits 3 when -o is missing (a usage error)', async () => {
    const r = await earmark('stimulus', '--kind', 'silence', '--seconds', '1');
    expect(r.code).toBe(3);
    expect(r.stderr).toMatch(/required option '-o, --out <file.wav>' not specified/);
  });
});
