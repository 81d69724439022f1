import { limitAt, type CapturePlot } from '@earmark/contracts';
import { bandAt } from './band-steps';
import { spectrumColumns } from './plot-data';

/**
 * The plotted curves as CSV, one row per plot column: frequency, the measured min and max, the
 * limits that apply there (a band's limits across its band) and, when drawn, the band level and
 * the last passing capture. The header names each column's unit. Numbers are written in full
 * (a dot for decimals, "-" for negatives) so spreadsheets and scripts read them as numbers.
 */
export function curvesCsv(plot: CapturePlot, options: { includeOverlay: boolean }): { csv: string; rows: number } {
  const unit = plot.unit;
  const columns = spectrumColumns(options.includeOverlay ? plot : { ...plot, overlay: null });
  const bands = plot.bands ?? null;
  const header = [
    'frequency (Hz)',
    `measured min (${unit})`,
    `measured max (${unit})`,
    `upper limit (${unit})`,
    `lower limit (${unit})`,
    ...(bands ? [`band level (${unit})`] : []),
    ...(columns.overlayMax ? [`last pass min (${unit})`, `last pass max (${unit})`] : []),
  ];
  const cell = (v: number | null | undefined) => (v === null || v === undefined || !Number.isFinite(v) ? '' : String(v));
  const lines = columns.hz.map((hz, i) => {
    const band = bands ? bandAt(bands, hz) : null;
    const upper = bands ? (band?.max ?? null) : plot.upper ? limitAt(plot.upper, hz) : null;
    const lower = bands ? (band?.min ?? null) : plot.lower ? limitAt(plot.lower, hz) : null;
    return [
      cell(hz),
      cell(columns.min[i]),
      cell(columns.max[i]),
      cell(upper),
      cell(lower),
      ...(bands ? [cell(band?.measured)] : []),
      ...(columns.overlayMax ? [cell(columns.overlayMin?.[i]), cell(columns.overlayMax[i])] : []),
    ].join(',');
  });
  return { csv: `${header.map((h) => `"${h}"`).join(',')}\n${lines.join('\n')}\n`, rows: lines.length };
}
