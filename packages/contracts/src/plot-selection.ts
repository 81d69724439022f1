import type { CaptureDetail } from './dashboard.js';
import type { MaskCheck } from './masks.js';

/**
 * Which view of a capture's spectrum a page opens on: one rule, read by the web's capture page,
 * the API's plot default and the worker's stored default plot, so all three show the same.
 */
export type PlotSelection = { checkId: string | null; channel: number };

/** What the rule reads of one check's result. */
export interface PlotCheckResult {
  id: string;
  pass: boolean;
  margin: number | null;
  /** Why the check could not be evaluated. */
  error?: string | null;
  /** A failing check an approved waiver covers. */
  waived?: boolean;
  /** The channel that set the numbers (the worst); null for checks over all channels at once. */
  channel?: number | null;
}

export interface PlotSelectionInput {
  /** The mask's checks, in its order. */
  checks: readonly MaskCheck[];
  /** The verdict's check results; empty before a verdict. */
  results: readonly PlotCheckResult[];
  /** The channel map the verdict was judged with (its first entry is the default channel). */
  channelMap?: readonly number[] | null;
  channelCount: number;
}

/** The checks a spectrum can draw limits for. */
export type SpectralMaskCheck = Extract<MaskCheck, { kind: 'magnitude-envelope' | 'band-levels' }>;
export const isSpectralMaskCheck = (c: MaskCheck): c is SpectralMaskCheck => c.kind === 'magnitude-envelope' || c.kind === 'band-levels';

/** The channel a check's numbers came from (its worst), else the first judged channel, else the check's first; within the capture. */
export function plotChannelFor(check: SpectralMaskCheck | null, result: PlotCheckResult | null, input: Pick<PlotSelectionInput, 'channelMap' | 'channelCount'>): number {
  const fromResult = result?.channel;
  const channel = typeof fromResult === 'number' ? fromResult : (input.channelMap?.[0] ?? check?.channels?.[0] ?? 0);
  return Math.max(0, Math.min(channel, input.channelCount - 1));
}

/** Failing first, then checks that could not be evaluated, waived failures, passing; then the smallest margin. */
function severity(result: PlotCheckResult | null): [number, number] {
  if (!result) return [3, Infinity];
  const rank = result.error ? 1 : !result.pass && !result.waived ? 0 : !result.pass ? 2 : 3;
  return [rank, result.margin ?? (rank < 3 ? -Infinity : Infinity)];
}

/**
 * Where a capture's spectrum opens: the failing spectral check with the smallest margin, on the
 * channel that set it, so a Fail verdict never opens on a plot with "no failing region". With
 * nothing failing: the mask's first envelope (else its first spectral check) on its worst channel.
 * Ties keep the mask's order.
 */
export function defaultPlotSelection(input: PlotSelectionInput): PlotSelection {
  const results = new Map(input.results.map((r) => [r.id, r]));
  const choices = input.checks.filter(isSpectralMaskCheck).map((check) => ({ check, result: results.get(check.id) ?? null }));
  let worst = choices[0];
  for (const c of choices.slice(1)) {
    const [rank, margin] = severity(c.result);
    const [bestRank, bestMargin] = severity(worst!.result);
    if (rank < bestRank || (rank === bestRank && margin < bestMargin)) worst = c;
  }
  const failing = worst && severity(worst.result)[0] < 3;
  const chosen = failing ? worst : (choices.find((c) => c.check.kind === 'magnitude-envelope') ?? choices[0]);
  return { checkId: chosen?.check.id ?? null, channel: plotChannelFor(chosen?.check ?? null, chosen?.result ?? null, input) };
}

/** The same rule over a capture page's data (the web's initial view). */
export function capturePlotSelection(detail: Pick<CaptureDetail, 'mask' | 'capture'>): PlotSelection {
  const verdict = detail.capture.verdict;
  return defaultPlotSelection({
    checks: detail.mask?.checks ?? [],
    results: (verdict?.checks ?? []).map((r) => ({ id: r.id, pass: r.pass, margin: r.margin, error: r.error ?? null, waived: Boolean(r.waiver), channel: r.channel ?? null })),
    channelMap: verdict?.settings?.channelMap ?? null,
    channelCount: detail.capture.channels,
  });
}
