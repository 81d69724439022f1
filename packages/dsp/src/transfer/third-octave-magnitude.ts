import { fractionalOctaveBands } from '../measures/octave-bands.js';
import type { TransferFunction } from './transfer-function.js';

/** Σ|H|²·Pxx / ΣPxx over each 1/3-octave band's valid bins, in dB. */
export function thirdOctaveMagnitudes(tf: TransferFunction, mag2: Float64Array): { centerHz: number; db: number }[] {
  const nyquist = (tf.re.length - 1) * tf.binHz;
  const out: { centerHz: number; db: number }[] = [];
  if (nyquist < 25) return out;
  for (const band of fractionalOctaveBands(3, 24, nyquist)) {
    if (band.upperHz > nyquist) continue;
    const k0 = Math.max(1, Math.ceil(band.lowerHz / tf.binHz - 1e-9));
    const k1 = Math.min(tf.re.length - 1, Math.ceil(band.upperHz / tf.binHz - 1e-9) - 1);
    let num = 0;
    let den = 0;
    for (let k = k0; k <= k1; k++) {
      if (!tf.valid[k]) continue;
      const p = tf.referencePower[k] as number;
      num += (mag2[k] as number) * p;
      den += p;
    }
    if (den > 0 && num > 0) out.push({ centerHz: band.nominalHz, db: 10 * Math.log10(num / den) });
  }
  return out;
}
