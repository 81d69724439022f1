import { describe, expect, it } from 'vitest';
import { AudioDecodeError, decodeRawFloat32, type AudioDecodeErrorCode } from '../../src/io/index.js';
import { hasPythonScipy, runPython } from './python-oracle.js';

function f32le(values: number[]): Uint8Array {
  const out = new Uint8Array(values.length * 4);
  values.forEach((v, i) => new DataView(out.buffer).setFloat32(i * 4, v, true));
  return out;
}

describe('decodeRawFloat32', () => {
  it('deinterleaves frames and keeps float32 values exactly', () => {
    const d = decodeRawFloat32(f32le([0.5, -0.25, 1.5, -2, 0.1, 0]), { sampleRate: 48000, channels: 2 });
    expect(d.frames).toBe(3);
    expect(Array.from(d.channels[0] ?? [])).toEqual([0.5, 1.5, Math.fround(0.1)]);
    expect(Array.from(d.channels[1] ?? [])).toEqual([-0.25, -2, 0]);
    expect(d.format).toEqual({ container: 'raw-f32le', encoding: 'float', bitsPerSample: 32, formatTag: 3, extensible: false });
  });

  it.skipIf(!hasPythonScipy())('matches numpy.frombuffer(dtype="<f4").reshape(-1, channels)', () => {
    // numpy reads the same bytes; our decode must equal its columns exactly.
    const values = Array.from({ length: 3 * 200 }, (_, i) => Math.sin(i * 0.37) * 1.3);
    const bytes = f32le(values);
    const theirs = runPython(
      'd = np.fromfile(FILES["raw.f32"], dtype="<f4").reshape(-1, 3).astype(np.float64)\nprint(json.dumps([d[:, c].tolist() for c in range(3)]))',
      {},
      { 'raw.f32': bytes },
    ) as number[][];
    const ours = decodeRawFloat32(bytes, { sampleRate: 96000, channels: 3 });
    ours.channels.forEach((ch, c) => expect(Array.from(ch)).toEqual(theirs[c]));
  });

  const errors: Array<[AudioDecodeErrorCode, Uint8Array, { sampleRate: number; channels: number }, RegExp]> = [
    ['raw-length-mismatch', new Uint8Array(10), { sampleRate: 48000, channels: 1 }, /10 bytes.*4 bytes each/],
    ['raw-length-mismatch', f32le([1, 2, 3]), { sampleRate: 48000, channels: 2 }, /12 bytes.*8 bytes each/],
    ['no-data', new Uint8Array(0), { sampleRate: 48000, channels: 1 }, /empty/],
    ['zero-channels', f32le([1]), { sampleRate: 48000, channels: 0 }, /1 to 8/],
    ['too-many-channels', f32le([1]), { sampleRate: 48000, channels: 9 }, /1 to 8/],
    ['sample-rate-out-of-range', f32le([1]), { sampleRate: 200000, channels: 1 }, /8000–192000/],
    ['invalid-option', f32le([1]), { sampleRate: 44100.5, channels: 1 }, /whole numbers/],
    ['non-finite-sample', f32le([0, Number.NEGATIVE_INFINITY]), { sampleRate: 48000, channels: 1 }, /sample 1 of channel 1 is -Infinity/],
  ];
  it.each(errors)('refuses with %s', (code, bytes, opts, message) => {
    let caught: unknown;
    try {
      decodeRawFloat32(bytes, opts);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(AudioDecodeError);
    expect((caught as AudioDecodeError).code).toBe(code);
    expect((caught as AudioDecodeError).message).toMatch(/^decodeRawFloat32: /);
    expect((caught as AudioDecodeError).message).toMatch(message);
  });
});
