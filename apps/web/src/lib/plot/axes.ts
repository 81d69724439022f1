import type uPlot from 'uplot';
import { formatHzTick, logFrequencyTicks, type FrequencyRange } from './log-frequency';
import { plotFonts, plotPalette } from './palette';
import { linearTicks, tickLabels } from './ticks';

/** A log-frequency x scale that keeps exactly the range asked for (uPlot would snap to decades). */
export function logFrequencyScale(domain: FrequencyRange | null): uPlot.Scale {
  return {
    distr: 3,
    log: 10,
    range: (_u, min, max) =>
      min !== null && max !== null && Number.isFinite(min) && Number.isFinite(max) && max > min && min > 0
        ? [min, max]
        : domain
          ? [domain.min, domain.max]
          : [20, 20000],
  };
}

const axisCommon = {
  stroke: plotPalette.ink500,
  font: plotFonts.axis,
  labelFont: plotFonts.label,
  ticks: { stroke: plotPalette.lineStrong, width: 1, size: 4 },
} satisfies Partial<uPlot.Axis>;

/** Labelled 1-2-5 frequency ticks, plus an unlabelled axis that only draws the 1…9 grid. */
export function frequencyAxes({ showLabel = true }: { showLabel?: boolean } = {}): uPlot.Axis[] {
  return [
    {
      ...axisCommon,
      scale: 'x',
      label: showLabel ? 'Frequency, Hz' : undefined,
      labelSize: showLabel ? 22 : 0,
      splits: (_u, _i, min, max) => logFrequencyTicks(min, max),
      // uPlot thins log-axis labels to powers of ten by default; these ticks are already chosen.
      filter: (_u, splits) => splits,
      values: (_u, splits) => splits.map((v) => (v === null || v === undefined ? '' : formatHzTick(v))),
      grid: { stroke: plotPalette.grid, width: 1 },
    },
    {
      scale: 'x',
      side: 2,
      size: 0,
      splits: (_u, _i, min, max) => {
        const labelled = new Set(logFrequencyTicks(min, max));
        const minor: number[] = [];
        for (let exp = Math.floor(Math.log10(min)); exp <= Math.ceil(Math.log10(max)); exp++) {
          for (let m = 1; m <= 9; m++) {
            const v = Number((m * 10 ** exp).toPrecision(12));
            if (v >= min && v <= max && !labelled.has(v)) minor.push(v);
          }
        }
        return minor;
      },
      filter: (_u, splits) => splits,
      values: (_u, splits) => splits.map(() => ''),
      grid: { stroke: plotPalette.gridMinor, width: 1 },
      ticks: { show: false },
    },
  ];
}

/** About one labelled tick per this many CSS pixels of axis length. */
const PIXELS_PER_TICK = 42;

/** Round ticks for a linear axis of the chart, at least three however short it is drawn. */
export function linearSplits(u: uPlot, min: number, max: number, vertical: boolean): number[] {
  const ratio = pixelRatio();
  const length = (vertical ? u.bbox.height : u.bbox.width) / ratio;
  const wanted = Math.max(3, Math.min(8, Math.floor(length / PIXELS_PER_TICK)));
  return linearTicks(min, max, wanted).ticks;
}

/**
 * A value axis on the left: its title says quantity and unit ("Phase, degrees"), its ticks are
 * round steps (`linearTicks`) labelled with the decimals the step needs and a real minus sign.
 * `_decimals` is kept for callers written before the ticks were chosen here.
 */
export function valueAxis(label: string, _decimals?: (span: number) => number, scale = 'y'): uPlot.Axis {
  return {
    ...axisCommon,
    scale,
    label,
    labelSize: 20,
    size: 56,
    splits: (u, _i, min, max) => linearSplits(u, min, max, true),
    values: (_u, splits) => tickLabels(splits),
    grid: { stroke: plotPalette.grid, width: 1 },
  };
}

/** A linear time axis at the bottom ("Time, s") with exact tick labels (0.25 s reads 0.25). */
export function timeAxis(label = 'Time, s'): uPlot.Axis {
  return {
    ...axisCommon,
    scale: 'x',
    label,
    labelSize: 22,
    splits: (u, _i, min, max) => linearSplits(u, min, max, false),
    values: (_u, splits) => tickLabels(splits),
    grid: { stroke: plotPalette.grid, width: 1 },
  };
}

/** Decimals that show a tick step exactly: 10 → 0, 0.5 → 1, 0.25 → 2. */
export function tickDecimals(step: number): number {
  if (!(step > 0) || !Number.isFinite(step)) return 0;
  for (let decimals = 0; decimals < 6; decimals++) {
    if (Math.abs(Math.round(step * 10 ** decimals) - step * 10 ** decimals) < 1e-6) return decimals;
  }
  return 6;
}

/** Canvas pixels per CSS pixel, as uPlot draws. */
export function pixelRatio(): number {
  return typeof window === 'undefined' ? 1 : window.devicePixelRatio || 1;
}
