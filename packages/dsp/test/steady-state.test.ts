import { describe, expect, it } from 'vitest';
import { evaluateMask, measureToneDistortion } from '../src/index.js';
import { MaskDocument } from '@earmark/contracts';

const FS = 48000;
const tone = (n: number, amp = 0.1, f = 997) => Float64Array.from({ length: n }, (_, i) => amp * Math.sin((2 * Math.PI * f * i) / FS));
function withLeadIn(x: Float64Array, gap: number, tail = 0): Float64Array {
  const out = new Float64Array(gap + x.length + tail);
  out.set(x, gap);
  return out;
}

describe('steady part of a record, as the mask and the report use it', () => {
  it('keeps a continuous tone whole', () => {
    const r = measureToneDistortion(tone(FS), FS);
    expect([r.window.start, r.window.end]).toEqual([0, FS]);
  });

  it('makes THD+N of a tone with a 24-sample latency read the tone, not the gap', () => {
    // A 0.1-amplitude tone: THD+N of the pure tone is limited only by float rounding (< −250 dB);
    // over the whole record the 24 missing samples alone read about 10·log10(24/48024) ≈ −33 dB.
    // (Before engine 1.0 a whole-record measure read about −33 dB here.)
    const x = withLeadIn(tone(FS), 24);
    const mask = MaskDocument.parse({ checks: [{ id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -100 }] });
    const evaluation = evaluateMask({ capture: { sampleRate: FS, channels: [x] } }, mask);
    expect(evaluation.verdict).toBe('pass');
    expect(evaluation.checks[0]!.measured!).toBeLessThan(-150);
    // The check says which part it measured: the lead-in is left out.
    expect((evaluation.checks[0]!.details.steadySeconds as number[])[0]).toBeGreaterThanOrEqual(24 / FS);
  });
});
