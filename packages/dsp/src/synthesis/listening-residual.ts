import type { AudioBuffers } from '../analyze/analyze-capture.js';
import { CaptureContext } from '../context/capture-context.js';
import { validateMaskInput } from '../masks/mask-input.js';
import { residualForListening } from './resynthesis.js';

/**
 * What a person should hear of each channel: for a tone, what remains after removing the
 * fundamental and its harmonics; for any other stimulus, the capture minus the
 * latency-aligned, gain-matched stimulus (the latency the verdict used), so what is heard is
 * what the firmware added or changed; without a stimulus, the capture. Band-limited to the
 * audio band.
 * @throws RangeError on a bad capture or a channel shorter than 64 samples
 * @see IEEE Std 1241-2010 §4.1.4 (fit residual); least-squares gain Σxy/Σy²
 */
export function listeningResidual(capture: AudioBuffers, reference: AudioBuffers | null, stimulusKind: string): Float64Array[] {
  const channels = validateMaskInput({ capture, ...(reference ? { reference } : {}) }, 'listeningResidual');
  const ctx = new CaptureContext({ capture, ...(reference ? { reference } : {}) }, channels);
  return channels.map((channel) => {
    const x = ctx.signal(channel);
    if (!reference || stimulusKind === 'sine') return residualForListening(x, capture.sampleRate, { removeHarmonics: stimulusKind === 'sine' });
    const ref = ctx.reference(channel);
    const lag = Math.max(0, Math.round(ctx.latency(channel)));
    let num = 0;
    let den = 0;
    for (let i = 0; i + lag < x.length && i < ref.length; i++) {
      num += (x[i + lag] as number) * (ref[i] as number);
      den += (ref[i] as number) ** 2;
    }
    const gain = den > 0 ? num / den : 0;
    const diff = Float64Array.from(x);
    for (let i = 0; i + lag < x.length && i < ref.length; i++) diff[i + lag] = (diff[i + lag] as number) - gain * (ref[i] as number);
    return residualForListening(diff, capture.sampleRate, { removeHarmonics: false });
  });
}
