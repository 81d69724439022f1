import type { CaptureDetail, CheckResultDto, MaskCheck } from '@earmark/contracts';

/** What the spectrum draws: one spectral check's limits over one channel. */
export type PlotSelection = { checkId: string | null; channel: number };

/** A spectral check of the mask with its result in the verdict (null before a verdict). */
export type SpectralChoice = { check: Extract<MaskCheck, { kind: 'magnitude-envelope' | 'band-levels' }>; result: CheckResultDto | null };

/** The mask's checks a spectrum can draw limits for, in the mask's order, each with its result. */
export function spectralChoices(detail: Pick<CaptureDetail, 'mask' | 'capture'>): SpectralChoice[] {
  const results = new Map((detail.capture.verdict?.checks ?? []).map((r) => [r.id, r]));
  return (detail.mask?.checks ?? []).flatMap((check) =>
    check.kind === 'magnitude-envelope' || check.kind === 'band-levels' ? [{ check, result: results.get(check.id) ?? null }] : [],
  );
}

/** The channel a check's numbers came from (its worst), within the capture; else the first judged channel. */
export function worstChannelOf(choice: SpectralChoice | undefined, detail: Pick<CaptureDetail, 'capture'>): number {
  const channels = detail.capture.channels;
  const fromResult = choice?.result?.channel;
  const fallback = detail.capture.verdict?.settings?.channelMap[0] ?? choice?.check.channels?.[0] ?? 0;
  const channel = typeof fromResult === 'number' ? fromResult : fallback;
  return Math.max(0, Math.min(channel, channels - 1));
}

/** Failing first, then checks that could not be evaluated, waived failures, passing; then the smallest margin. */
function severity(choice: SpectralChoice): [number, number] {
  const r = choice.result;
  if (!r) return [3, Infinity];
  const rank = r.error ? 1 : !r.pass && !r.waiver ? 0 : !r.pass ? 2 : 3;
  return [rank, r.margin ?? (rank < 3 ? -Infinity : Infinity)];
}

/**
 * Where the capture page opens: the failing spectral check with the smallest margin, on the
 * channel that set it, so a Fail verdict never opens on a plot with "no failing region". With
 * nothing failing: the mask's first envelope (else its first spectral check) on its worst channel.
 */
export function defaultPlotSelection(detail: Pick<CaptureDetail, 'mask' | 'capture'>): PlotSelection {
  const choices = spectralChoices(detail);
  if (choices.length === 0) return { checkId: null, channel: worstChannelOf(undefined, detail) };
  let worst: SpectralChoice | undefined;
  for (const c of choices) {
    if (!worst) {
      worst = c;
      continue;
    }
    const [rank, margin] = severity(c);
    const [bestRank, bestMargin] = severity(worst);
    if (rank < bestRank || (rank === bestRank && margin < bestMargin)) worst = c;
  }
  const failing = worst && severity(worst)[0] < 3;
  const chosen = failing ? worst : (choices.find((c) => c.check.kind === 'magnitude-envelope') ?? choices[0]);
  return { checkId: chosen?.check.id ?? null, channel: worstChannelOf(chosen, detail) };
}
