import { describe, expect, it } from 'vitest';
import { evaluateMask, measureDistortion, steadyStateRange } from '../src/index.js';
import { MaskDocument } from '@earmark/contracts';

const FS = 48000;
const tone = (n: number, amp = 0.1, f = 997) => Float64Array.from({ length: n }, (_, i) => amp * Math.sin((2 * Math.PI * f * i) / FS));
function withLeadIn(x: Float64Array, gap: number, tail = 0): Float64Array {
  const out = new Float64Array(gap + x.length + tail);
  out.set(x, gap);
  return out;
}

describe('steady part of a record', () => {
  it('keeps a continuous tone whole', () => {
    expect(steadyStateRange(tone(FS), FS)).toEqual([0, FS]);
  });

  it('skips a latency lead-in and a silent tail plus 20 ms of settling on each side', () => {
    const x = withLeadIn(tone(FS), 480, 960); // 10 ms of latency, 20 ms of silence after
    const [start, end] = steadyStateRange(x, FS);
    // Onset at sample 480 (sin(0) = 0, so the first sample above 1 % of peak follows within a sample or two).
    expect(start).toBeGreaterThanOrEqual(480 + 960);
    expect(start).toBeLessThan(480 + 960 + 3);
    expect(end).toBeLessThanOrEqual(480 + FS - 960);
    expect(end).toBeGreaterThan(480 + FS - 960 - 3);
  });

  it('leaves the record whole when the steady part would be shorter than 100 ms', () => {
    const x = withLeadIn(tone(4800), 4800);
    expect(steadyStateRange(x, FS)).toEqual([0, x.length]);
  });

  it('makes THD+N of a tone with a 24-sample latency read the tone, not the gap', () => {
    // A 0.1-amplitude tone: THD+N of the pure tone is limited only by float rounding (< −250 dB);
    // over the whole record the 24 missing samples alone read about 10·log10(24/48024) ≈ −33 dB.
    const x = withLeadIn(tone(FS), 24);
    const whole = measureDistortion(x, FS);
    expect(whole.tone!.thdnDb).toBeGreaterThan(-40);
    const mask = MaskDocument.parse({ checks: [{ id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -100 }] });
    const evaluation = evaluateMask({ capture: { sampleRate: FS, channels: [x] } }, mask);
    expect(evaluation.verdict).toBe('pass');
    expect(evaluation.checks[0]!.measured!).toBeLessThan(-150);
  });
});
