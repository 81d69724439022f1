import { CapturePlot, PlotQuery, type JudgingSettings, type MaskCheck } from '@earmark/contracts';
import { ENGINE_VERSION, type CaptureContext, type DecodedAudio } from '@earmark/dsp';
import type { ObjectStore } from '@earmark/platform';
import { z } from 'zod';
import { renderCapturePlot, type CapturePlotCore } from './render-capture-plot.js';
import { defaultPlotView, plotCheckResult } from './plot-view.js';
import type { CheckJudgement } from '../judging/judgement.js';
import type { PlayedStimulus } from '../judging/stimulus-cache.js';

/**
 * A stored plot: the curves, or why the capture cannot be drawn — a refusal is stored too, so
 * a capture that cannot be plotted answers the same 422 at once on the next view.
 */
export const StoredPlot = z.union([
  z.object({ plot: CapturePlot.omit({ overlay: true }) }),
  z.object({ refusal: z.object({ code: z.string(), detail: z.string() }) }),
]);
export type StoredPlot = z.infer<typeof StoredPlot>;

/** What a plot depends on; its key names every part, so a new verdict, mask or engine simply misses. */
export interface PlotIdentity {
  captureId: string;
  /** The mask revision the capture was judged against (null: judged without one, or not yet). */
  maskRevisionId: string | null;
  columns: number;
  /** Resolved already (asked, else the default view's), so "the default" and its number share one entry. */
  channel: number;
  /** The spectral check drawn, resolved already (asked, else `defaultPlotView`); null when the mask has none. */
  checkId: string | null;
}

/** Where every stored plot lives; one folder per capture, so its plots can be deleted together (retention). */
export const PLOT_CACHE_PREFIX = 'plot-cache/';
export const plotPrefixOf = (captureId: string): string => `${PLOT_CACHE_PREFIX}${captureId}/`;

export const plotKey = (p: PlotIdentity): string => `${plotPrefixOf(p.captureId)}${ENGINE_VERSION}-${p.maskRevisionId ?? 'none'}-${p.checkId ?? 'none'}-${p.columns}-${p.channel}.json`;

/** The stored plot, or null when there is none (or it cannot be read: the store is only a cache). */
export async function readStoredPlot(objectStore: ObjectStore, identity: PlotIdentity): Promise<StoredPlot | null> {
  try {
    return StoredPlot.parse(JSON.parse((await objectStore.get(plotKey(identity))).toString('utf8')));
  } catch {
    return null;
  }
}

/** Stores a plot; a store that is down only costs the next view a computation. */
export async function writeStoredPlot(objectStore: ObjectStore, identity: PlotIdentity, stored: StoredPlot): Promise<void> {
  await objectStore.put(plotKey(identity), Buffer.from(JSON.stringify(stored)), 'application/json').catch(() => {});
}

/** Columns of the plot the capture page asks for first. */
export const DEFAULT_PLOT_COLUMNS = PlotQuery.parse({}).columns;

/** What the worker knows after a verdict: the capture's decoded audio and what it was judged with. */
export interface DefaultPlotInput {
  captureId: string;
  /** The mask revision the verdict was judged against (null: none in force). */
  maskRevisionId: string | null;
  settings: JudgingSettings;
  checks: readonly MaskCheck[];
  audio: DecodedAudio;
  /** The stimulus as played, when the caller already holds it. */
  played?: PlayedStimulus;
  /** The verdict's capture context (`judgingContext`), when the caller judged this audio just now. */
  context?: CaptureContext;
  /** The verdict's check results: the plot opens on its worst failing spectral check, as the capture page does. */
  verdictChecks?: readonly CheckJudgement[];
}

/**
 * The default plot (default columns; the check and channel `defaultPlotView` picks from the verdict) of a capture from audio already decoded,
 * with the identity it is stored under; pure, so it can run in the thread that holds the audio.
 */
export function renderDefaultPlot(input: DefaultPlotInput): { identity: PlotIdentity; stored: StoredPlot } {
  const identity: PlotIdentity = {
    captureId: input.captureId,
    maskRevisionId: input.maskRevisionId,
    columns: DEFAULT_PLOT_COLUMNS,
    ...defaultPlotView(
      input.checks,
      (input.verdictChecks ?? []).map((c) => plotCheckResult(c.id, c.pass, c.margin, c.details)),
      input.settings.channelMap,
      input.audio.channels.length,
    ),
  };
  try {
    return { identity, stored: { plot: renderCapturePlot(input.audio, input.settings, input.checks, identity, input.played, input.context) } };
  } catch (error) {
    return { identity, stored: { refusal: { code: 'cannot-plot', detail: `Capture ${input.captureId} cannot be plotted: ${error instanceof Error ? error.message : String(error)}` } } };
  }
}

/**
 * Precomputes and stores the default plot of a capture, so its first view is a read. For the
 * worker after a verdict (or `renderDefaultPlot` in its analysis thread, then `writeStoredPlot`).
 */
export async function storeDefaultPlot(objectStore: ObjectStore, input: DefaultPlotInput): Promise<void> {
  const { identity, stored } = renderDefaultPlot(input);
  await writeStoredPlot(objectStore, identity, stored);
}

export type { CapturePlotCore };
