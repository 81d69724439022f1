// Field report 18: SMPTE and twin-tone intermodulation through y = x + 0.01·x², and crosstalk
// with a −60 dB leak, through evaluateMask only. Captures carry 10 ms of idle 24-bit TPDF noise
// before and after the stimulus (the path's latency and the recorder's run-out).
import { describe, expect, it } from 'vitest';
import { StimulusSpec } from '@earmark/contracts';
import { evaluateMask, stimulusAsPlayed } from '../../src/index.js';
import { add, tpdfDither } from '../timing/timing-signals.js';
import { dither24, polynomial, withLeadIn } from '../imd/imd-signals.js';
import { checkOf, mask } from './real-capture-helpers.js';

const FS = 48000;
const A2 = 0.01;
const LEVEL = 10 ** (-1 / 20);

/** The stimulus of a spec through y = x + 0.01·x², framed by `lead` samples of idle noise before and after, in 24 bits. */
function throughSquareLaw(spec: StimulusSpec, lead: number, seed: number): { sampleRate: number; channels: Float64Array[] } {
  const x = stimulusAsPlayed(spec).channels[0] as Float64Array;
  return { sampleRate: FS, channels: [dither24(withLeadIn(polynomial(x, A2, 0), lead, lead), seed)] };
}

describe('report 18: intermodulation and crosstalk', () => {
  // SMPTE RP120 / IEC 60268-3: 60 Hz and 7 kHz, 4:1, combined peak A1 + A2 = 10^(−1/20).
  const smpte = StimulusSpec.parse({ kind: 'imd-smpte', sampleRate: FS, seconds: 1, levelDbfs: -1 });
  // x² holds 2·A1·A2·sin ω1t·sin ω2t = A1·A2·[cos(ω2 − ω1)t − cos(ω2 + ω1)t]: sidebands of a·A1·A2
  // each and no change at f2, so IMD = √2·a·A1·A2/A2 = √2·a·A1 = 1.0083 % (RSS form of docs/masks.md).
  const expectedSmpte = 100 * Math.SQRT2 * A2 * 0.8 * LEVEL;
  const smpteCheck = mask({ id: 'smpte', kind: 'distortion', metric: 'imd-smpte-percent', max: 2 });

  it('SMPTE IMD of a capture holding only the stimulus reads √2·a·A1', () => {
    const measured = checkOf(evaluateMask({ capture: throughSquareLaw(smpte, 0, 1) }, smpteCheck), 'smpte').measured ?? 0;
    // ±1 % of the value (0.09 dB): the 24-bit dither lies 80 dB under the −58 dBFS sidebands.
    expect(Math.abs(measured / expectedSmpte - 1)).toBeLessThan(0.01);
  });

  it('SMPTE IMD reads the same with 10 ms of idle noise before and after the stimulus', () => {
    const measured = checkOf(evaluateMask({ capture: throughSquareLaw(smpte, 480, 2) }, smpteCheck), 'smpte').measured ?? 0;
    // The same closed form: latency and run-out are not part of the path's distortion.
    expect(Math.abs(measured / expectedSmpte - 1)).toBeLessThan(0.01);
  });

  it('twin-tone difference-frequency distortion reads a·A_low·A_high/(A_low + A_high)', () => {
    // 18 kHz + 19 kHz, equal tones A = 10^(−1/20)/2; x² puts a·A² at f2 − f1 = 1 kHz, and d2 is
    // relative to A_low + A_high (docs/masks.md, IEC 60268-3): a·A/2 = 0.2228 %.
    const twin = StimulusSpec.parse({ kind: 'imd-twin-tone', sampleRate: FS, seconds: 1, levelDbfs: -1 });
    const result = evaluateMask({ capture: throughSquareLaw(twin, 480, 3) }, mask({ id: 'dfd', kind: 'distortion', metric: 'imd-dfd-percent', max: 1 }));
    const expected = (100 * A2 * (LEVEL / 2) * (LEVEL / 2)) / LEVEL;
    // ±1 %, as above.
    expect(Math.abs((checkOf(result, 'dfd').measured ?? 0) / expected - 1)).toBeLessThan(0.01);
  });

  it('a −60 dB leak into the undriven channel reads a separation of 60 dB', () => {
    const drive = stimulusAsPlayed(StimulusSpec.parse({ kind: 'pink-noise', sampleRate: FS, seconds: 2, levelDbfs: -20, seed: 8 })).channels[0] as Float64Array;
    const driven = add(drive, tpdfDither(drive.length, 24, 1));
    const leak = add(
      drive.map((v) => v * 1e-3),
      tpdfDither(drive.length, 24, 2),
    );
    const result = evaluateMask({ capture: { sampleRate: FS, channels: [driven, leak] } }, mask({ id: 'xt', kind: 'crosstalk', drivenChannel: 0, minDb: 55 }));
    const xt = checkOf(result, 'xt');
    // Separation = 20·log10(1/10⁻³) = 60 dB in every band (IEC 60268-3); the worst band within
    // 0.05 dB: the dither under the leak (−141 dBFS against −80 dBFS) moves it by < 0.001 dB.
    expect(xt.pass).toBe(true);
    expect(Math.abs((xt.measured ?? 0) - 60)).toBeLessThan(0.05);
  });
});
