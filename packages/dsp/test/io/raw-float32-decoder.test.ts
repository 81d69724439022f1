import { describe, expect, it } from 'vitest';
import { AudioDecodeError, decodeRawFloat32 } from '../../src/io/index.js';
import { hasPythonScipy, runPython } from './python-oracle.js';
import { RAW_ERROR_CASES, f32le } from './raw-error-cases.js';

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

  it.each(RAW_ERROR_CASES)('refuses with %s', (code, bytes, opts, message) => {
    let caught: unknown;
    try {
      decodeRawFloat32(bytes, opts);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(AudioDecodeError);
    expect((caught as AudioDecodeError).code).toBe(code);
    // A sentence for the uploader, naming no internal function.
    expect((caught as AudioDecodeError).message).toMatch(/^[A-Z]/);
    expect((caught as AudioDecodeError).message).not.toMatch(/decodeRawFloat32/);
    expect((caught as AudioDecodeError).message).toMatch(message);
  });
});
