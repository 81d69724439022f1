import type { EncodeWavOptions } from '@earmark/dsp';

/** `--bits` values and the WAV layout each one writes. */
export const BIT_CHOICES: Readonly<Record<string, { options: EncodeWavOptions; label: string }>> = {
  '16': { options: { encoding: 'pcm-int', bitsPerSample: 16 }, label: '16-bit PCM' },
  '24': { options: { encoding: 'pcm-int', bitsPerSample: 24 }, label: '24-bit PCM' },
  '32': { options: { encoding: 'pcm-int', bitsPerSample: 32 }, label: '32-bit PCM' },
  float32: { options: { encoding: 'float', bitsPerSample: 32 }, label: '32-bit float' },
  float64: { options: { encoding: 'float', bitsPerSample: 64 }, label: '64-bit float' },
};
