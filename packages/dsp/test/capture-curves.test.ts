import { describe, expect, it } from 'vitest';
import { MaskCheck, MaskDocument, StimulusSpec, type MagnitudeEnvelopeCheck } from '@earmark/contracts';
import { MaskCheckError, analyzeCapture, captureCurves, evaluateMask, stimulusAsPlayed } from '../src/index.js';
import { addNoise, delay } from '../src/testing/index.js';

// The capture page's curves and the verdict for a periodic stimulus (a sine): its latency is
// ambiguous — every whole period fits as well (Knapp & Carter 1976) — so phase and group delay
// are not drawn and phase checks are errors, while |H| at the tone stays measurable (a whole
// number of periods of misalignment leaves a periodic signal's spectrum unchanged).
const FS = 48000;
const spec = StimulusSpec.parse({ kind: 'sine', sampleRate: FS, seconds: 2, frequency: 997, levelDbfs: -20 });
const reference = stimulusAsPlayed(spec);
const capture = { sampleRate: FS, channels: [addNoise(delay(reference.channels[0]!, 24), -110, 1)] };
const transferSpectrum = MaskCheck.parse({ id: 'spectrum', kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 20, db: 400 }, { hz: 19000, db: 400 }] }) as MagnitudeEnvelopeCheck;

describe('a periodic stimulus', () => {
  it('draws |H| without phase, and the report keeps |H| and the warning', () => {
    const curves = captureCurves({ capture, reference, transferMethod: 'h1' }, transferSpectrum, { columns: 256, channel: 0 });
    expect(curves.phase).toBeNull();
    expect(curves.groupDelay).toBeNull();
    // The only bins with stimulus energy are around 997 Hz: the pass-through path reads 0 dB there (±0.01 dB).
    const at = curves.spectrum.hz.findIndex((hz, i) => hz > 900 && hz < 1100 && curves.spectrum.measuredMax[i] !== null);
    expect(at).toBeGreaterThanOrEqual(0);
    expect(Math.abs(curves.spectrum.measuredMax[at] as number)).toBeLessThan(0.01);
    expect(curves.warnings.some((w) => /ambiguous/.test(w))).toBe(true);
    const t = analyzeCapture(capture, { reference, transferMethod: 'h1' }).channels[0]!.transfer!;
    expect(t.groupDelayMs.mean).toBeNull();
    expect(t.linearPhaseDeviationDeg).toBeNull();
    expect(t.magnitudeDb.find((m) => m.centerHz === 1000)?.db ?? NaN).toBeCloseTo(0, 1);
  });

  it('makes phase and latency checks errors that say why, and keeps magnitude checks', () => {
    const result = evaluateMask({ capture, reference, transferMethod: 'h1' }, MaskDocument.parse({ checks: [
      { id: 'phase', kind: 'phase-linearity', maxDeviationDeg: 5 },
      { id: 'latency', kind: 'timing', metric: 'latency-ms', max: 5 },
      { id: 'gain', kind: 'band-levels', fraction: 3, measure: 'transfer', referenceHz: null, bands: [{ centerHz: 1000, min: -0.5, max: 0.5 }] },
    ] }));
    const byId = Object.fromEntries(result.checks.map((c) => [c.id, c]));
    expect(byId.phase?.error).toMatch(/unambiguous latency/);
    expect(byId.latency?.error).toMatch(/ambiguous/);
    expect(byId.gain?.error).toBeNull();
    expect(byId.gain?.pass).toBe(true);
    expect(result.verdict).toBe('error');
  });

  it('a capture missing most of its sweep cannot give curves over a transfer check: the caller falls back to the level spectrum', () => {
    const sweep = stimulusAsPlayed(StimulusSpec.parse({ kind: 'sweep', sampleRate: FS, seconds: 1, from: 20, to: 20000, levelDbfs: -20, silenceSeconds: 0.2 }));
    const late = new Float64Array(sweep.channels[0]!.length);
    late.set(sweep.channels[0]!.subarray(0, late.length - FS / 2), FS / 2);
    expect(() => captureCurves({ capture: { sampleRate: FS, channels: [late] }, reference: sweep }, transferSpectrum, { columns: 256, channel: 0 })).toThrow(MaskCheckError);
    const level = MaskCheck.parse({ ...transferSpectrum, measure: 'level' }) as MagnitudeEnvelopeCheck;
    const curves = captureCurves({ capture: { sampleRate: FS, channels: [late] }, reference: sweep }, level, { columns: 256, channel: 0 });
    expect(curves.spectrum.unit).toBe('dBFS');
    expect(curves.phase).toBeNull();
  });
});
