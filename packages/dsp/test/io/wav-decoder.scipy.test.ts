// decodeWav against scipy.io.wavfile.read: the fixtures in reference/wav were written by
// scipy / Python's `wave` / struct-packed headers and read back by scipy (generate.py); the
// expected samples are scipy's, scaled as Earmark states (integers ÷ 2^(bits−1)).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import nodeWav from 'node-wav';
import { describe, expect, it } from 'vitest';
import { decodeWav } from '../../src/io/index.js';
import { hasPythonScipy } from './python-oracle.js';

const referenceDir = join(dirname(fileURLToPath(import.meta.url)), '../../reference/wav');
const fixturesDir = join(referenceDir, 'fixtures');

interface Case {
  file: string;
  frames: number;
  channels: number;
  samples: number[][];
  sampleRate: number;
  bitsPerSample: number;
  encoding: 'pcm-int' | 'float';
  formatTag: number;
  extensible: boolean;
  channelMask?: number;
  validBitsPerSample?: number;
}

const expected = JSON.parse(readFileSync(join(fixturesDir, 'expected.json'), 'utf8')) as { cases: Case[] };

describe('decodeWav vs scipy.io.wavfile.read (reference/wav/generate.py)', () => {
  it('covers every layout the decoder reads', () => {
    const layouts = new Set(expected.cases.map((c) => `${c.encoding}${c.bitsPerSample}${c.extensible ? 'x' : ''}`));
    for (const l of ['pcm-int8', 'pcm-int16', 'pcm-int24', 'pcm-int32', 'float32', 'float64', 'pcm-int16x', 'pcm-int24x', 'float32x']) {
      expect(layouts.has(l), l).toBe(true);
    }
    expect(Math.max(...expected.cases.map((c) => c.channels))).toBe(8);
  });

  for (const c of expected.cases) {
    it(`${c.file}: sample-exact after scaling`, () => {
      const decoded = decodeWav(new Uint8Array(readFileSync(join(fixturesDir, c.file))));
      expect(decoded.sampleRate).toBe(c.sampleRate);
      expect(decoded.frames).toBe(c.frames);
      expect(decoded.channels.length).toBe(c.channels);
      expect(decoded.format.container).toBe('wav');
      expect(decoded.format.encoding).toBe(c.encoding);
      expect(decoded.format.bitsPerSample).toBe(c.bitsPerSample);
      expect(decoded.format.formatTag).toBe(c.formatTag);
      expect(decoded.format.extensible).toBe(c.extensible);
      expect(decoded.format.channelMask).toBe(c.channelMask);
      expect(decoded.format.validBitsPerSample).toBe(c.validBitsPerSample);
      for (let ch = 0; ch < c.channels; ch++) {
        // Exact equality: both sides are the same integer divided by a power of two.
        expect(Array.from(decoded.channels[ch] ?? [])).toEqual(c.samples[ch]);
      }
    });
  }
});

describe('decodeWav vs node-wav 0.0.2 (plain integer PCM; it refuses unaligned float data)', () => {
  // node-wav scales positive integers by 2^(b−1) − 1 and negative ones by 2^(b−1) and returns
  // Float32Arrays (its index.js), so compare integer codes recovered from each side. Its
  // 24-bit reader takes 0x800000 (the most negative code) as +2^23 (`xx > 0x800000`); scipy
  // agrees with us there (the fixtures above), so that one code is compared as −2^23.
  const plainIntAligned = expected.cases.filter(
    (c) => !c.extensible && c.encoding === 'pcm-int' && !c.file.startsWith('chunks') && !c.file.includes('odd'),
  );
  for (const c of plainIntAligned) {
    it(`${c.file}`, () => {
      const bytes = readFileSync(join(fixturesDir, c.file));
      // A fresh copy: node-wav 0.0.2 mishandles a Buffer with a non-zero byteOffset.
      const theirs = nodeWav.decode(new Uint8Array(bytes));
      const ours = decodeWav(new Uint8Array(bytes));
      expect(theirs.sampleRate).toBe(ours.sampleRate);
      expect(theirs.channelData.length).toBe(ours.channels.length);
      const full = 2 ** (c.bitsPerSample - 1);
      // float32 keeps 24 significant bits: 32-bit codes may differ by float32 rounding.
      const tolerance = c.bitsPerSample === 32 ? 2 ** 8 : 0;
      ours.channels.forEach((ch, k) => {
        const other = theirs.channelData[k] ?? new Float32Array();
        for (let i = 0; i < ch.length; i++) {
          const o = other[i] ?? NaN;
          let theirCode = Math.round(o < 0 ? o * full : o * (full - 1));
          if (c.bitsPerSample === 24 && theirCode === full) theirCode = -full;
          const ourCode = Math.round((ch[i] ?? NaN) * full);
          expect(Math.abs(ourCode - theirCode)).toBeLessThanOrEqual(tolerance);
        }
      });
    });
  }
});

describe.skipIf(!hasPythonScipy())('reference/wav fixtures have not drifted', () => {
  it('re-running generate.py writes the same files and expected samples', () => {
    const dir = mkdtempSync(join(tmpdir(), 'earmark-wav-ref-'));
    try {
      const r = spawnSync('python3', ['-W', 'ignore', join(referenceDir, 'generate.py'), dir], { encoding: 'utf8' });
      expect(r.status, r.stderr).toBe(0);
      const names = readdirSync(fixturesDir).sort();
      expect(readdirSync(dir).sort()).toEqual(names);
      for (const name of names.filter((n) => n.endsWith('.wav'))) {
        expect(Buffer.compare(readFileSync(join(dir, name)), readFileSync(join(fixturesDir, name))), name).toBe(0);
      }
      const fresh = JSON.parse(readFileSync(join(dir, 'expected.json'), 'utf8')) as { cases: Case[] };
      expect(fresh.cases).toEqual(expected.cases);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
