import { formatFrequency, type CapturePlot } from '@earmark/contracts';

type Measure = 'transfer' | 'level';

/** What the spectrum plots, from the plot when it has come, else from the check chosen. */
export type SpectrumMeaning = { measure: Measure; normalisedAtHz: number | null };

/** The plot's own account of what it drew; older answers without it read as the unit says. */
export function meaningOfPlot(plot: Pick<CapturePlot, 'unit' | 'measure' | 'normalisedAtHz'>): SpectrumMeaning {
  const measure = plot.measure ?? (plot.unit === 'dBFS' ? 'level' : 'transfer');
  return { measure, normalisedAtHz: measure === 'transfer' ? (plot.normalisedAtHz ?? null) : null };
}

/** The panel's title: what the curve is. */
export function spectrumPanelTitle(meaning: SpectrumMeaning): string {
  return meaning.measure === 'transfer' ? 'Transfer magnitude' : 'Level spectrum';
}

/** The value axis's title, quantity and unit: "|H| re 1 kHz, dB", "|H|, dB", "Level, dBFS". */
export function spectrumAxisTitle(meaning: SpectrumMeaning): string {
  if (meaning.measure === 'level') return 'Level, dBFS';
  return meaning.normalisedAtHz === null ? '|H|, dB' : `|H| re ${formatFrequency(meaning.normalisedAtHz)}, dB`;
}

/** The same in a sentence, under the plot: "the capture over the stimulus, normalised to 0 dB at 1 kHz". */
export function spectrumDescription(meaning: SpectrumMeaning): string {
  if (meaning.measure === 'level') return "the capture's own level spectrum";
  return meaning.normalisedAtHz === null
    ? 'the transfer magnitude |H| (capture over stimulus), not normalised'
    : `the transfer magnitude |H| (capture over stimulus), normalised to 0 dB at ${formatFrequency(meaning.normalisedAtHz)}`;
}

export const PHASE_AXIS_TITLE = 'Phase, degrees';
export const GROUP_DELAY_AXIS_TITLE = 'Group delay, ms';
export const TIME_AXIS_TITLE = 'Time, s';
export const SAMPLE_AXIS_TITLE = 'Sample value, FS';
