import type { CapturePlot } from '@earmark/contracts';
import { useDeferredValue, useMemo } from 'react';
import type uPlot from 'uplot';
import { ErrorState } from '@/components/error-state';
import { useCapturePlot } from '../api/get-capture-plot';
import type { CaptureView } from '../hooks/use-capture-view';
import { responseColumns, spectrumColumns } from '../utils/plot-data';
import { GROUP_DELAY_AXIS_TITLE, PHASE_AXIS_TITLE } from '../utils/plot-titles';
import { frequencyAxes, logFrequencyScale, valueAxis } from '@/lib/plot/axes';
import type { FrequencyRange } from '@/lib/plot/log-frequency';
import { plotPalette } from '@/lib/plot/palette';
import { PanelCard } from './panel-card';
import { PlotCanvas } from './plot-canvas';
import { PlotSkeleton } from './plot-skeleton';

const HEIGHT = 190;

type Curve = { hz: number[]; values: number[] };

function curveOptions(domain: FrequencyRange, axisLabel: string): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => ({
    legend: { show: false },
    padding: [10, 18, 0, 0],
    cursor: { drag: { x: true, y: false, setScale: true }, points: { show: false }, y: false },
    scales: {
      x: logFrequencyScale(domain),
      y: {
        range: (_u, min, max) => {
          const span = Math.max(max - min, 1e-3);
          return [min - span * 0.1, max + span * 0.1];
        },
      },
    },
    axes: [...frequencyAxes(), valueAxis(axisLabel)],
    series: [{}, { label: axisLabel, stroke: plotPalette.ink900, width: 1.5, points: { show: false } }],
  });
}

/**
 * The frequency span these plots share with the magnitude plot above, so a frequency sits at the
 * same place in all three; the curve's own span when there is no magnitude curve.
 */
function sharedDomain(spectrum: FrequencyRange | null, curve: Curve): FrequencyRange {
  return spectrum ?? { min: curve.hz[0] as number, max: curve.hz[curve.hz.length - 1] as number };
}

function ResponsePlot({ label, axisLabel, curve, view, spectrumDomain }: { label: string; axisLabel: string; curve: Curve; view: CaptureView; spectrumDomain: FrequencyRange | null }) {
  const data = useMemo<uPlot.AlignedData>(() => [curve.hz, curve.values], [curve]);
  const domain = useMemo(() => sharedDomain(spectrumDomain, curve), [spectrumDomain, curve]);
  const buildOptions = useMemo(() => curveOptions(domain, axisLabel), [domain, axisLabel]);
  return (
    <PlotCanvas
      label={label}
      height={HEIGHT}
      data={data}
      buildOptions={buildOptions}
      logX
      xDomain={domain}
      xRange={view.frequencyRange}
      onXRangeChange={view.setFrequencyRange}
    />
  );
}

function curves(plot: CapturePlot): { phase: Curve | null; groupDelay: Curve | null; domain: FrequencyRange | null } {
  return {
    domain: spectrumColumns({ spectrum: plot.spectrum, overlay: null }).domain,
    phase: responseColumns(plot.phase ? { hz: plot.phase.hz, values: plot.phase.deg } : null),
    groupDelay: responseColumns(plot.groupDelay ? { hz: plot.groupDelay.hz, values: plot.groupDelay.ms } : null),
  };
}

/** Unwrapped phase and group delay of the transfer function, zoomed together with the spectrum. */
export function ResponsePanel({ projectKey, captureId, view }: { projectKey: string; captureId: string; view: CaptureView }) {
  const plotQuery = useCapturePlot(projectKey, captureId, view.plotParams);
  // NOTE: deferred so the spectrum, the plot people look at first, draws before this one.
  const plot = useDeferredValue(plotQuery.data);
  const prepared = useMemo(() => (plot ? curves(plot) : null), [plot]);

  return (
    <PanelCard title="Phase and group delay" aside={<span className="text-xs text-ink-500">Transfer function, zoom follows the spectrum</span>}>
      {plotQuery.isError && !plotQuery.data ? (
        <ErrorState error={plotQuery.error} onRetry={() => void plotQuery.refetch()} />
      ) : !prepared ? (
        <div className="space-y-4">
          <PlotSkeleton height={HEIGHT} />
          <PlotSkeleton height={HEIGHT} />
        </div>
      ) : !prepared.phase && !prepared.groupDelay ? (
        <p className="rounded-md border border-dashed border-line-strong px-4 py-8 text-center text-sm text-ink-600">
          Phase and group delay come from the transfer function, which needs the stimulus. This capture was analysed without one.
        </p>
      ) : (
        <div className="space-y-4">
          {prepared.phase ? (
            <div>
              <h3 className="mb-1 text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">Unwrapped phase</h3>
              <ResponsePlot label="Unwrapped phase" axisLabel={PHASE_AXIS_TITLE} curve={prepared.phase} view={view} spectrumDomain={prepared.domain} />
            </div>
          ) : null}
          {prepared.groupDelay ? (
            <div>
              <h3 className="mb-1 text-xs font-semibold uppercase tracking-[0.06em] text-ink-500">Group delay</h3>
              <ResponsePlot label="Group delay" axisLabel={GROUP_DELAY_AXIS_TITLE} curve={prepared.groupDelay} view={view} spectrumDomain={prepared.domain} />
            </div>
          ) : null}
        </div>
      )}
    </PanelCard>
  );
}
