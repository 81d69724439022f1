import { formatDecibels, formatFrequency, formatMargin, limitAt, type DeriveMaskResponse, type LimitPoint } from '@earmark/contracts';
import { useMemo } from 'react';
import type uPlot from 'uplot';
import { PlotFigure } from '@/components/plot-figure';
import { frequencyAxes, logFrequencyScale, tickDecimals, valueAxis } from '@/lib/plot/axes';
import { plotPalette } from '@/lib/plot/palette';

/** What the y axis shows: the level, or |H| normalised at the reference frequency (absolute without one). */
function valueTitle(unit: string, referenceHz: number | null): string {
  if (unit === 'dBFS') return 'Level, dBFS';
  return referenceHz === null ? '|H|, dB' : `|H| re ${formatFrequency(referenceHz)}, dB`;
}

function previewOptions(yTitle: string, domain: { min: number; max: number }, curves: number, outlying: ReadonlySet<number>): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => ({
    legend: { show: false },
    padding: [12, 16, 0, 0],
    cursor: { drag: { x: false, y: false }, points: { show: false }, y: false },
    scales: { x: logFrequencyScale(domain), y: { auto: true } },
    axes: [...frequencyAxes(), valueAxis(yTitle, tickDecimals)],
    series: [
      {},
      // Outliers are drawn last among the captures so they stay visible on top of the others.
      ...Array.from({ length: curves }, (_, i) =>
        outlying.has(i)
          ? { label: `Golden capture ${i + 1} (outlier)`, stroke: plotPalette.fail, width: 1.25, points: { show: false } }
          : { label: `Golden capture ${i + 1}`, stroke: plotPalette.ink300, width: 0.75, points: { show: false } },
      ),
      { label: 'Mean', stroke: plotPalette.ink900, width: 1.5, points: { show: false } },
      { label: 'New upper limit', stroke: plotPalette.brass600, width: 1.75, dash: [6, 4], points: { show: false } },
      // Upper brass long dashes, lower dark brass dash-dot: the capture page's legend (docs/design.md, Plots).
      { label: 'New lower limit', stroke: plotPalette.lowerLimit, width: 1.75, dash: [10, 3, 2, 3], points: { show: false } },
    ],
  });
}

function Breakpoints({ name, limit }: { name: string; limit: readonly LimitPoint[] | null | undefined }) {
  return (
    <div className="min-w-0">
      <h4 className="text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">{name}</h4>
      {limit?.length ? (
        <ol aria-label={`${name} breakpoints`} className="mt-1 flex flex-wrap gap-x-3 gap-y-0.5 font-mono text-xs tabular-nums text-ink-900">
          {limit.map((p) => (
            <li key={p.hz} className="whitespace-nowrap">
              {formatFrequency(p.hz)} <span className="text-ink-600">{formatMargin(p.db, 'dB')}</span>
            </li>
          ))}
        </ol>
      ) : (
        <p className="mt-1 text-xs text-ink-600">none</p>
      )}
    </div>
  );
}

/**
 * The NEW check the derivation proposes: every golden capture's curve (outliers in the fail
 * colour), their mean and the new simplified limits, with the breakpoints in words.
 */
export function DerivePreview({ result, checkId, outlying }: { result: DeriveMaskResponse; checkId: string; outlying: ReadonlySet<number> }) {
  const { stats, check } = result;
  const curves = stats.curves ?? [];
  const data = useMemo<uPlot.AlignedData>(
    () => [
      stats.hz,
      ...curves,
      stats.mean,
      stats.hz.map((hz) => (check.upper ? limitAt(check.upper, hz) : null)),
      stats.hz.map((hz) => (check.lower ? limitAt(check.lower, hz) : null)),
    ],
    [stats, curves, check],
  );
  const first = stats.hz[0] ?? 20;
  const last = stats.hz[stats.hz.length - 1] ?? 20000;
  // Keyed by the set's contents: a new Set with the same members must not rebuild the chart.
  const outlierKey = [...outlying].sort().join(',');
  const yTitle = valueTitle(stats.unit, result.derivation.referenceHz);
  const buildOptions = useMemo(() => previewOptions(yTitle, { min: first, max: last > first ? last : first * 2 }, curves.length, outlying), [yTitle, first, last, curves.length, outlierKey]);
  return (
    <div className="space-y-3">
      <PlotFigure
        label="New check preview"
        summary={`The ${stats.captures} golden captures as thin lines${outlying.size ? `, ${outlying.size} outlying in red` : ''}, their mean, and the new limits of ${checkId}.`}
        height={260}
        data={data}
        buildOptions={buildOptions}
      />
      <p className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-600" aria-hidden>
        <span><span className="mr-1 inline-block h-px w-4 bg-ink-300 align-middle" />golden captures</span>
        {outlying.size ? <span><span className="mr-1 inline-block h-0.5 w-4 bg-fail align-middle" />outlier</span> : null}
        <span><span className="mr-1 inline-block h-0.5 w-4 bg-ink-900 align-middle" />mean</span>
        <span><span className="mr-1 inline-block w-4 border-t-2 border-dashed border-brass-600 align-middle" />new upper limit of {checkId}</span>
        <span><span className="mr-1 inline-block w-4 border-t-2 border-dotted border-brass-800 align-middle" />new lower limit</span>
      </p>
      <div className="grid gap-3 sm:grid-cols-2">
        <Breakpoints name="Upper limit" limit={check.upper} />
        <Breakpoints name="Lower limit" limit={check.lower} />
      </div>
      <dl className="grid grid-cols-2 gap-x-6 gap-y-1.5 text-sm sm:grid-cols-4">
        {[
          ['Captures', String(stats.captures)],
          ['Breakpoints', `${check.upper?.length ?? 0} upper · ${check.lower?.length ?? 0} lower`],
          ['Max widening', formatDecibels(stats.maxDeviationDb.overall)],
          ['Worst golden margin', formatMargin(stats.worstGoldenMarginDb, 'dB')],
        ].map(([term, value]) => (
          <div key={term}>
            <dt className="text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">{term}</dt>
            <dd className="font-mono tabular-nums text-ink-950">{value}</dd>
          </div>
        ))}
      </dl>
    </div>
  );
}
