/**
 * Tick positions and labels for linear axes (time, level, phase, delay). uPlot would choose
 * its own, and label them with too few decimals (0.25 s read "0.3"); these are chosen here so
 * every axis has several ticks on round steps and each label shows its value exactly.
 */
import { MINUS } from '@earmark/contracts';

/** 1, 2, 2.5 or 5 times a power of ten, the smallest at least `raw`. */
export function niceStep(raw: number): number {
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const power = 10 ** Math.floor(Math.log10(raw));
  const fraction = raw / power;
  const nice = fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 2.5 ? 2.5 : fraction <= 5 ? 5 : 10;
  return nice * power;
}

/**
 * Ticks on round steps inside [min, max]: the largest step that still gives at least
 * `minTicks` of them (at most about 2.5 × that many), so even a short axis has several.
 */
export function linearTicks(min: number, max: number, minTicks = 4): { step: number; ticks: number[] } {
  if (!Number.isFinite(min) || !Number.isFinite(max) || !(max > min)) return { step: 1, ticks: Number.isFinite(min) ? [min] : [] };
  let step = niceStep((max - min) / minTicks);
  const count = (s: number) => Math.floor(max / s + 1e-9) - Math.ceil(min / s - 1e-9) + 1;
  // A nice step rounded up can leave fewer ticks than asked: go one nice step down.
  while (count(step) < minTicks) step = niceStep(step / 2.01);
  const ticks: number[] = [];
  for (let k = Math.ceil(min / step - 1e-9); k <= Math.floor(max / step + 1e-9); k++) ticks.push(Number((k * step).toPrecision(12)));
  return { step, ticks };
}

/** Decimals that show a tick step exactly: 10 → 0, 0.5 → 1, 0.25 → 2. */
export function stepDecimals(step: number): number {
  if (!(step > 0) || !Number.isFinite(step)) return 0;
  for (let decimals = 0; decimals < 6; decimals++) {
    const scaled = step * 10 ** decimals;
    if (Math.abs(Math.round(scaled) - scaled) < 1e-6 * Math.max(1, scaled)) return decimals;
  }
  return 6;
}

const formatters = new Map<number, Intl.NumberFormat>();

/** A tick label with the decimals its step needs and a real minus sign ("0.25", "−12.5", "−40"). */
export function tickLabel(value: number, step: number): string {
  const decimals = stepDecimals(step);
  let format = formatters.get(decimals);
  if (!format) {
    format = new Intl.NumberFormat('en-US', { minimumFractionDigits: decimals, maximumFractionDigits: decimals, useGrouping: false });
    formatters.set(decimals, format);
  }
  const text = format.format(Math.abs(value) < step * 1e-9 ? 0 : value);
  return text.replace('-', MINUS);
}

/** Labels for a set of evenly spaced ticks (the step is read from them). */
export function tickLabels(ticks: readonly (number | null | undefined)[]): string[] {
  const values = ticks.filter((t): t is number => typeof t === 'number');
  const step = values.length >= 2 ? Math.abs((values[1] as number) - (values[0] as number)) : 1;
  return ticks.map((t) => (typeof t === 'number' ? tickLabel(t, step) : ''));
}
