import { defaultPlotSelection, type MaskCheck, type PlotCheckResult, type PlotSelection } from '@earmark/contracts';
import { waiverMarkOf } from '../judging/waiver-coverage.js';

/**
 * A check result as the plot rule reads it, from a just-judged check (the worker's thread) or a
 * stored one (the API): both keep the worst channel, an error and a waiver mark in `details`,
 * read here exactly as the capture presenter reads them for the web.
 */
export function plotCheckResult(id: string, pass: boolean, margin: number | null, details: Record<string, unknown>): PlotCheckResult {
  return {
    id,
    pass,
    margin: margin !== null && Number.isFinite(margin) ? margin : null,
    error: typeof details.error === 'string' ? details.error : null,
    waived: waiverMarkOf(details) !== null,
    channel: typeof details.channel === 'number' ? details.channel : null,
  };
}

/**
 * The view a capture's plot opens on (contracts `defaultPlotSelection`, which the web's capture
 * page reads too), with the channel within the capture.
 */
export function defaultPlotView(checks: readonly MaskCheck[], results: readonly PlotCheckResult[], channelMap: readonly number[], channelCount: number): PlotSelection {
  return defaultPlotSelection({ checks, results, channelMap, channelCount });
}
