import type { JudgingSettings } from '@earmark/contracts';
import { formatHz } from './plot/log-frequency';

const KIND_WORDS: Record<JudgingSettings['stimulus']['kind'], string> = {
  sine: 'sine',
  multitone: 'multitone',
  sweep: 'sweep',
  impulse: 'impulse',
  'white-noise': 'white noise',
  'pink-noise': 'pink noise',
  silence: 'silence',
  'imd-smpte': 'two-tone IMD',
  'imd-twin-tone': 'twin-tone IMD',
};

/** "sine 997 Hz · 48 kHz", "sweep 20 Hz–20 kHz · 96 kHz": the stimulus kind, its defining frequency and rate. */
export function describeStimulusBrief(stimulus: JudgingSettings['stimulus']): string {
  const rate = `${stimulus.sampleRate / 1000} kHz`;
  const detail =
    stimulus.kind === 'sine'
      ? ` ${formatHz(stimulus.frequency)}`
      : stimulus.kind === 'sweep'
        ? ` ${formatHz(stimulus.from)}–${formatHz(stimulus.to)}`
        : stimulus.kind === 'imd-smpte' || stimulus.kind === 'imd-twin-tone'
          ? ` ${formatHz(stimulus.lowFrequency)} + ${formatHz(stimulus.highFrequency)}`
          : '';
  return `${KIND_WORDS[stimulus.kind]}${detail} · ${rate}`;
}

/**
 * "H1, band 100 Hz–10 kHz", "deconvolution (default), band auto": the transfer estimator (the
 * engine's default for the stimulus when none is set) and the analysis band.
 */
export function describeAnalysis(settings: Pick<JudgingSettings, 'stimulus' | 'analysis'>): string {
  const { transferMethod, transferBandHz } = settings.analysis;
  const method = transferMethod ?? (settings.stimulus.kind === 'sweep' ? 'deconvolution' : 'h1');
  const name = method === 'h1' ? 'H1' : 'deconvolution';
  const band = transferBandHz ? `${formatHz(transferBandHz[0])}–${formatHz(transferBandHz[1])}` : 'auto';
  return `${name}${transferMethod ? '' : ' (default)'}, band ${band}`;
}

/** "0, 1" or "all": the capture channels analysed (counting from 0). */
export function describeChannelMap(channelMap: readonly number[]): string {
  return channelMap.length ? channelMap.join(', ') : 'all';
}
