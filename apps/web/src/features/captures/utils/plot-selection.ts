import { capturePlotSelection, plotChannelFor, type CaptureDetail, type CheckResultDto, type PlotSelection, type SpectralMaskCheck } from '@earmark/contracts';

/** What the spectrum draws: one spectral check's limits over one channel (the rule is shared with the API and the worker). */
export type { PlotSelection };

/** A spectral check of the mask with its result in the verdict (null before a verdict). */
export type SpectralChoice = { check: SpectralMaskCheck; result: CheckResultDto | null };

/** The mask's checks a spectrum can draw limits for, in the mask's order, each with its result. */
export function spectralChoices(detail: Pick<CaptureDetail, 'mask' | 'capture'>): SpectralChoice[] {
  const results = new Map((detail.capture.verdict?.checks ?? []).map((r) => [r.id, r]));
  return (detail.mask?.checks ?? []).flatMap((check) =>
    check.kind === 'magnitude-envelope' || check.kind === 'band-levels' ? [{ check, result: results.get(check.id) ?? null }] : [],
  );
}

/** The channel a check's numbers came from (its worst), within the capture; else the first judged channel. */
export function worstChannelOf(choice: SpectralChoice | undefined, detail: Pick<CaptureDetail, 'capture'>): number {
  return plotChannelFor(choice?.check ?? null, choice?.result ?? null, { channelMap: detail.capture.verdict?.settings?.channelMap ?? null, channelCount: detail.capture.channels });
}

/**
 * Where the capture page opens: the failing spectral check with the smallest margin, on the
 * channel that set it (`capturePlotSelection` in contracts: the API's plot default and the
 * worker's stored plot follow the same rule).
 */
export const defaultPlotSelection = (detail: Pick<CaptureDetail, 'mask' | 'capture'>): PlotSelection => capturePlotSelection(detail);
