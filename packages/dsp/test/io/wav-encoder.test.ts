import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decodeWav, encodeWav } from '../../src/io/index.js';
import { hasPythonScipy, runPython } from './python-oracle.js';
import { refusedBy } from '../helpers/refused.js';

function ramp(frames: number, seed: number): Float64Array {
  // A deterministic wandering signal that visits most of [−1, 1].
  return new Float64Array(frames).map((_, i) => Math.sin(i * 0.731 + seed) * Math.cos(i * 0.0173 * seed));
}

describe('encodeWav → decodeWav round trip', () => {
  it('is exact for float64 and exact to float32 rounding for float32', () => {
    const a = ramp(257, 1).map((x) => x * 3); // float may exceed full scale
    const b = ramp(257, 2);
    const d64 = decodeWav(encodeWav([a, b], 44100, { encoding: 'float', bitsPerSample: 64 }));
    expect(Array.from(d64.channels[0] ?? [])).toEqual(Array.from(a));
    const d32 = decodeWav(encodeWav([a, b], 44100, { encoding: 'float' }));
    expect(d32.format).toMatchObject({ encoding: 'float', bitsPerSample: 32, formatTag: 3 });
    expect(Array.from(d32.channels[1] ?? [])).toEqual(Array.from(b, (x) => Math.fround(x)));
  });

  it.each([16, 24, 32] as const)('is within ½ LSB for %i-bit PCM, and clamps +1.0 to the top code', (bits) => {
    const x = ramp(1000, 3);
    x[0] = -1;
    x[1] = 1;
    const d = decodeWav(encodeWav([x], 48000, { bitsPerSample: bits }));
    const lsb = 2 ** (1 - bits);
    for (let i = 2; i < x.length; i++) expect(Math.abs((d.channels[0]?.[i] ?? NaN) - (x[i] ?? NaN))).toBeLessThanOrEqual(lsb / 2);
    expect(d.channels[0]?.[0]).toBe(-1);
    expect(d.channels[0]?.[1]).toBe(1 - lsb);
  });

  it('property: any finite samples survive a round trip (float exact, PCM ½ LSB)', () => {
    const bitsArb = fc.constantFrom<16 | 24 | 32>(16, 24, 32);
    const sample = fc.double({ min: -1, max: 1, noNaN: true });
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 8 }),
        fc.integer({ min: 1, max: 40 }),
        fc.array(sample, { minLength: 1, maxLength: 320 }),
        bitsArb,
        fc.integer({ min: 8000, max: 192000 }),
        (channelCount, frames, pool, bits, rate) => {
          const channels = Array.from({ length: channelCount }, (_, c) =>
            Float64Array.from({ length: frames }, (_, i) => pool[(c * frames + i) % pool.length] ?? 0),
          );
          const asFloat = decodeWav(encodeWav(channels, rate, { encoding: 'float', bitsPerSample: 64 }));
          const asPcm = decodeWav(encodeWav(channels, rate, { bitsPerSample: bits }));
          expect(asFloat.sampleRate).toBe(rate);
          expect(asPcm.format.extensible).toBe(channelCount > 2);
          const top = 1 - 2 ** (1 - bits);
          channels.forEach((ch, c) => {
            expect(Array.from(asFloat.channels[c] ?? [])).toEqual(Array.from(ch));
            ch.forEach((v, i) => {
              const err = Math.abs((asPcm.channels[c]?.[i] ?? NaN) - Math.min(v, top));
              expect(err).toBeLessThanOrEqual(2 ** -bits);
            });
          });
        },
      ),
      { numRuns: 150 },
    );
  });

  it('TPDF dither is repeatable with its seed and stays within 1½ LSB', () => {
    const x = new Float64Array(4000).fill(0.3);
    const a = encodeWav([x], 48000, { bitsPerSample: 16, dither: { kind: 'tpdf', seed: 7 } });
    const b = encodeWav([x], 48000, { bitsPerSample: 16, dither: { kind: 'tpdf', seed: 7 } });
    const c = encodeWav([x], 48000, { bitsPerSample: 16, dither: { kind: 'tpdf', seed: 8 } });
    expect(Buffer.compare(a, b)).toBe(0);
    expect(Buffer.compare(a, c)).not.toBe(0);
    const d = decodeWav(a).channels[0] ?? new Float64Array();
    const lsb = 2 ** -15;
    let mean = 0;
    for (const v of d) {
      expect(Math.abs(v - 0.3)).toBeLessThanOrEqual(1.5 * lsb);
      mean += v / d.length;
    }
    // TPDF dither is zero-mean: the average lands within a small fraction of an LSB of 0.3.
    expect(Math.abs(mean - 0.3)).toBeLessThan(0.05 * lsb);
    const distinct = new Set(d);
    expect(distinct.size).toBeGreaterThanOrEqual(2); // without dither every sample is the same code
  });

  it('refuses what cannot be written', () => {
    const x = new Float64Array(4);
    expect(() => encodeWav([], 48000)).toThrow(refusedBy('encodeWav', /^a WAV file needs 1 to 8 channels \(got 0\)$/));
    expect(() => encodeWav(new Array(9).fill(x) as Float64Array[], 48000)).toThrow(/1 to 8 channels/);
    expect(() => encodeWav([x, new Float64Array(3)], 48000)).toThrow(/same length/);
    expect(() => encodeWav([x], 7999)).toThrow(/sample rate/);
    expect(() => encodeWav([x], 48000, { encoding: 'float', bitsPerSample: 16 })).toThrow(/16-bit float is not supported/);
    expect(() => encodeWav([x], 48000, { bitsPerSample: 64 })).toThrow(/64-bit pcm-int/);
    expect(() => encodeWav([Float64Array.of(0, Number.NaN)], 48000)).toThrow(/sample 1 of channel 1 is NaN/);
  });
});

describe.skipIf(!hasPythonScipy())('encodeWav output read by scipy.io.wavfile and Python wave', () => {
  it('scipy reads every layout with the codes the stated rounding rule gives (computed by numpy)', () => {
    const x = ramp(300, 5);
    x[0] = 1;
    x[1] = -1;
    x[2] = 0.5 / 32768; // an exact half: Math.round goes up, like numpy floor(x + 0.5)
    const y = ramp(300, 6).map((v) => v * 0.5);
    const files: Record<string, Uint8Array> = {
      'p16.wav': encodeWav([x, y], 44100, { bitsPerSample: 16 }),
      'p24.wav': encodeWav([x, y], 48000, { bitsPerSample: 24 }),
      'p32.wav': encodeWav([x, y], 96000, { bitsPerSample: 32 }),
      'f32.wav': encodeWav([x, y], 8000, { encoding: 'float' }),
      'f64.wav': encodeWav([x, y], 192000, { encoding: 'float', bitsPerSample: 64 }),
      'x24.wav': encodeWav([x, y, x, y, x, y], 48000, { bitsPerSample: 24 }),
      'xf32.wav': encodeWav([x, y, y, x], 48000, { encoding: 'float' }),
    };
    const script = `
import scipy.io.wavfile as wf
x, y = IN["x"], IN["y"]
def codes(v, bits):
    s = 2.0 ** (bits - 1)
    return np.clip(np.floor(v * s + 0.5), -s, s - 1)
out = {}
for name, cols, bits, kind in [("p16.wav", [x, y], 16, "i"), ("p24.wav", [x, y], 24, "i"), ("p32.wav", [x, y], 32, "i"),
                               ("f32.wav", [x, y], 32, "f"), ("f64.wav", [x, y], 64, "f"),
                               ("x24.wav", [x, y, x, y, x, y], 24, "i"), ("xf32.wav", [x, y, y, x], 32, "f")]:
    rate, d = wf.read(FILES[name])
    want = np.stack([codes(c, bits) if kind == "i" else c.astype(np.float32 if bits == 32 else np.float64) for c in cols], axis=1)
    got = d.astype(np.float64)
    if name.startswith("p24") or name.startswith("x24"):
        got = got / 256.0  # scipy left-justifies 24-bit samples in int32
    out[name] = dict(rate=int(rate), dtype=str(d.dtype), shape=list(d.shape), equal=bool(np.array_equal(got, want.astype(np.float64))))
print(json.dumps(out))
`;
    const result = runPython(script, { x, y }, files) as Record<string, { rate: number; dtype: string; shape: number[]; equal: boolean }>;
    expect(result['p16.wav']).toEqual({ rate: 44100, dtype: 'int16', shape: [300, 2], equal: true });
    expect(result['p24.wav']).toEqual({ rate: 48000, dtype: 'int32', shape: [300, 2], equal: true });
    expect(result['p32.wav']).toEqual({ rate: 96000, dtype: 'int32', shape: [300, 2], equal: true });
    expect(result['f32.wav']).toEqual({ rate: 8000, dtype: 'float32', shape: [300, 2], equal: true });
    expect(result['f64.wav']).toEqual({ rate: 192000, dtype: 'float64', shape: [300, 2], equal: true });
    expect(result['x24.wav']).toEqual({ rate: 48000, dtype: 'int32', shape: [300, 6], equal: true });
    expect(result['xf32.wav']).toEqual({ rate: 48000, dtype: 'float32', shape: [300, 4], equal: true });
  });

  it("Python's wave module reads the plain PCM header fields", () => {
    const x = ramp(123, 9);
    const files = { 'a.wav': encodeWav([x, x], 22050, { bitsPerSample: 16 }), 'b.wav': encodeWav([x], 16000, { bitsPerSample: 24 }) };
    const r = runPython(
      `import wave
out = {}
for n in ["a.wav", "b.wav"]:
    with wave.open(FILES[n], "rb") as w:
        out[n] = [w.getnchannels(), w.getsampwidth(), w.getframerate(), w.getnframes()]
print(json.dumps(out))`,
      {},
      files,
    );
    expect(r).toEqual({ 'a.wav': [2, 2, 22050, 123], 'b.wav': [1, 3, 16000, 123] });
  });
});
