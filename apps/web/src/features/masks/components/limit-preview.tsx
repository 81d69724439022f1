import { formatMarginAt, type LimitPoint } from '@earmark/contracts';
import { useId, useMemo } from 'react';
import type uPlot from 'uplot';
import { ErrorState } from '@/components/error-state';
import { Select } from '@/components/form-controls';
import { PlotFigure } from '@/components/plot-figure';
import { Skeleton } from '@/components/skeleton';
import { frequencyAxes, logFrequencyScale, tickDecimals, valueAxis } from '@/lib/plot/axes';
import { plotPalette } from '@/lib/plot/palette';
import { shortSha } from '@/lib/sha';
import type { CandidateCapture } from '../api/get-candidate-captures';
import { usePreviewPlot } from '../api/get-preview-plot';
import { previewColumns, previewYRange, worstPreviewMargin } from '../utils/limit-preview';

const HEIGHT = 300;

function buildPreviewOptions(unit: string, domain: { min: number; max: number } | null): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => ({
    legend: { show: false },
    padding: [12, 16, 0, 0],
    cursor: { drag: { x: false, y: false }, points: { show: false }, y: false },
    scales: {
      x: logFrequencyScale(domain),
      y: {
        range: (u) => {
          const [hz, max, min, upper, lower] = u.data as unknown as [number[], (number | null)[], (number | null)[], (number | null)[], (number | null)[]];
          const range = previewYRange({ hz, max, min, upper, lower });
          return [range.min, range.max];
        },
      },
    },
    axes: [...frequencyAxes(), valueAxis(unit === 'dBFS' ? 'Level (dBFS)' : 'Magnitude (dB)', tickDecimals)],
    series: [
      {},
      { label: 'Measured (max)', stroke: plotPalette.ink900, width: 1.25, points: { show: false } },
      { label: 'Measured (min)', stroke: plotPalette.ink900, width: 1.25, points: { show: false } },
      { label: 'Upper limit', stroke: plotPalette.brass600, width: 1.75, dash: [6, 4], points: { show: false } },
      { label: 'Lower limit', stroke: plotPalette.brass600, width: 1.75, dash: [6, 4], points: { show: false } },
    ],
    bands: [
      { series: [1, 2], fill: plotPalette.measuredBand },
      { series: [3, 4], fill: plotPalette.allowedZone },
    ],
  });
}

function captureOption(c: CandidateCapture): string {
  const build = c.label ? `${shortSha(c.buildSha)} ${c.label}` : shortSha(c.buildSha);
  return `${build} · ${c.target} · ${c.outcome}`;
}

/**
 * The draft's magnitude-envelope limits over a capture's spectrum, redrawn as the limits are
 * edited (only the data changes; the chart is not rebuilt). The margin read-out is an
 * estimate on the plotted columns; the engine's evaluation decides the verdict.
 */
export function LimitPreview({
  projectKey,
  candidates,
  captureId,
  onCaptureChange,
  upper,
  lower,
  checkName,
}: {
  projectKey: string;
  candidates: { data: CandidateCapture[] | undefined; isPending: boolean; error: unknown };
  captureId: string | null;
  onCaptureChange: (captureId: string) => void;
  upper: LimitPoint[] | null;
  lower: LimitPoint[] | null;
  /** Which check the limits belong to, for the caption; null when the draft has no envelope. */
  checkName: string | null;
}) {
  const selectId = useId();
  const plot = usePreviewPlot(projectKey, captureId);
  const spectrum = plot.data?.spectrum ?? null;
  const columns = useMemo(() => (spectrum ? previewColumns(spectrum, upper, lower) : null), [spectrum, upper, lower]);
  const data = useMemo<uPlot.AlignedData | null>(
    () => (columns ? [columns.hz, columns.max, columns.min, columns.upper, columns.lower] : null),
    [columns],
  );
  const unit = plot.data?.unit ?? 'dB';
  const first = columns?.hz[0];
  const last = columns?.hz[columns.hz.length - 1];
  const domainMin = first ?? null;
  const domainMax = last ?? null;
  const buildOptions = useMemo(
    () => buildPreviewOptions(unit, domainMin !== null && domainMax !== null && domainMax > domainMin ? { min: domainMin, max: domainMax } : null),
    [unit, domainMin, domainMax],
  );
  const worst = columns ? worstPreviewMargin(columns) : null;

  return (
    <section aria-labelledby={`${selectId}-title`} className="rounded-lg border border-line bg-paper-raised">
      <div className="flex flex-wrap items-end justify-between gap-3 border-b border-line px-4 py-3">
        <div>
          <h2 id={`${selectId}-title`} className="text-sm font-semibold text-ink-950">
            Live preview
          </h2>
          <p className="text-xs text-ink-500">{checkName ? <>Limits of <span className="font-mono">{checkName}</span> over a recent capture of this test case.</> : 'Add a magnitude-envelope check to see its limits here.'}</p>
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor={selectId} className="text-[11px] font-semibold uppercase tracking-[0.07em] text-ink-500">
            Capture
          </label>
          <Select id={selectId} value={captureId ?? ''} onChange={(e) => onCaptureChange(e.target.value)} disabled={!candidates.data?.length} className="w-72">
            {candidates.data?.length ? null : <option value="">{candidates.isPending ? 'Loading captures…' : 'No captures in recent builds'}</option>}
            {candidates.data?.map((c) => (
              <option key={c.captureId} value={c.captureId}>
                {captureOption(c)}
              </option>
            ))}
          </Select>
        </div>
      </div>
      <div className="px-4 py-3">
        {candidates.error ? (
          <ErrorState error={candidates.error} />
        ) : plot.isError ? (
          <ErrorState error={plot.error} onRetry={() => void plot.refetch()} />
        ) : captureId === null && !candidates.isPending ? (
          <p className="py-10 text-center text-sm text-ink-600">No capture of this test case in the recent builds to draw under the limits.</p>
        ) : !data ? (
          <Skeleton className="w-full rounded-md" />
        ) : (
          <PlotFigure
            label="Limit preview"
            summary={
              worst
                ? `The selected capture against the draft limits; smallest margin ${formatMarginAt(worst.margin, unit, worst.hz)}.`
                : 'The selected capture; the draft has no limits that apply to it.'
            }
            height={HEIGHT}
            data={data}
            buildOptions={buildOptions}
          />
        )}
        {!data && captureId !== null ? <div style={{ height: HEIGHT }} aria-hidden="true" className="-mt-px animate-pulse rounded-md bg-ink-900/[0.05]" /> : null}
        <div className="mt-2 flex flex-wrap items-center justify-between gap-3 text-xs text-ink-600">
          <span className="flex items-center gap-3">
            <span className="inline-flex items-center gap-1.5">
              <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
                <rect x="0" y="3" width="24" height="6" fill={plotPalette.measuredBand} />
                <path d="M0 3h24M0 9h24" stroke={plotPalette.ink900} strokeWidth="1.25" />
              </svg>
              Measured
            </span>
            <span className="inline-flex items-center gap-1.5">
              <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
                <path d="M0 6h24" stroke={plotPalette.brass600} strokeWidth="1.75" strokeDasharray="6 4" />
              </svg>
              Draft limits
            </span>
          </span>
          {worst ? (
            <span role="status" className="font-mono">
              {worst.margin >= 0 ? 'Inside' : 'Outside'} by {formatMarginAt(worst.margin, unit, worst.hz)} ({worst.side})
            </span>
          ) : null}
        </div>
      </div>
    </section>
  );
}
