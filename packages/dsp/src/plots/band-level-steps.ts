import type { BandLevelsCheck } from '@earmark/contracts';
import type { CaptureContext } from '../context/capture-context.js';
import { nearestOctaveBand } from '../masks/band-matching.js';
import { bandValue } from '../masks/checks/band-levels.check.js';
import { MaskCheckError } from '../masks/mask-check-error.js';

/** One band of a band-levels check as a plot draws it: a step from its lower to its upper edge. */
export interface BandLevelStep {
  /** The band's nominal label (31.5, 1000, 1250). */
  nominalHz: number;
  lowerHz: number;
  upperHz: number;
  /** The band's level in the check's unit; null when this band cannot be measured (see `error`). */
  measured: number | null;
  min: number | null;
  max: number | null;
  /** Distance to the nearer limit, positive inside; null without a measured level. */
  margin: number | null;
  error: string | null;
}

/**
 * Every band of a band-levels check on one channel, with the very numbers the verdict uses
 * (`bandValue`), so a plot can draw the measured level and both limits as steps over each band.
 * A band that cannot be measured keeps its limits and says why, rather than failing the plot.
 */
export function bandLevelSteps(ctx: CaptureContext, check: BandLevelsCheck, channel: number): BandLevelStep[] {
  return check.bands.map((limit) => {
    const band = nearestOctaveBand(check.fraction, limit.centerHz);
    const min = limit.min ?? null;
    const max = limit.max ?? null;
    const step = { nominalHz: band.nominalHz, lowerHz: band.lowerHz, upperHz: band.upperHz, min, max };
    try {
      const measured = bandValue(ctx, channel, check, band);
      const margins = [max === null ? null : max - measured, min === null ? null : measured - min].filter((m): m is number => m !== null);
      return { ...step, measured, margin: margins.length ? Math.min(...margins) : null, error: null };
    } catch (error) {
      if (!(error instanceof MaskCheckError)) throw error;
      return { ...step, measured: null, margin: null, error: error.message };
    }
  });
}
