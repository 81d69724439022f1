import type { StimulusSpec } from '@earmark/contracts';

/** The loudness caution printed with every stimulus written (docs/stimuli.md). */
export const LOUDNESS_CAUTION =
  'caution: test signals can be loud; playing them through loudspeakers or headphones can damage hearing and drivers. Start at a low playback level.';

function hz(f: number): string {
  return f >= 1000 && f % 100 === 0 ? `${f / 1000} kHz` : `${f} Hz`;
}

/** A few words about what the spec makes, e.g. `sweep 20 Hz–20 kHz over 5 s`. */
export function describeSignal(spec: StimulusSpec): string {
  switch (spec.kind) {
    case 'sine':
      return `sine ${hz(spec.frequency)}, ${spec.seconds} s`;
    case 'multitone': {
      const tones = spec.frequencies?.length ?? spec.count ?? 0;
      return `multitone of ${tones} tone(s) (${spec.phases} phases), ${spec.seconds} s`;
    }
    case 'sweep':
      return `sweep ${hz(spec.from)}–${hz(spec.to)} over ${spec.seconds} s${spec.silenceSeconds > 0 ? ` + ${spec.silenceSeconds} s silence` : ''}`;
    case 'impulse':
      return `impulse at sample ${spec.delaySamples}, ${spec.seconds} s`;
    case 'white-noise':
    case 'pink-noise':
      return `${spec.kind.replace('-', ' ')} (seed ${spec.seed}), ${spec.seconds} s`;
    case 'silence':
      return `silence, ${spec.seconds} s`;
    case 'imd-smpte':
      return `SMPTE IMD ${hz(spec.lowFrequency)} + ${hz(spec.highFrequency)} (${spec.ratio}:1), ${spec.seconds} s`;
    case 'imd-twin-tone':
      return `twin tone ${hz(spec.lowFrequency)} + ${hz(spec.highFrequency)}, ${spec.seconds} s`;
  }
}

/** Peak level in dBFS (peak of a full-scale sine = 0 dBFS); "−inf" for silence. */
export function peakDbfs(channels: Float64Array[]): string {
  let peak = 0;
  for (const ch of channels) for (const v of ch) peak = Math.max(peak, Math.abs(v));
  return peak === 0 ? '-inf dBFS' : `${(20 * Math.log10(peak)).toFixed(1)} dBFS`;
}
