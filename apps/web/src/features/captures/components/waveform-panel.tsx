import { formatFrequency, formatSeconds, type CaptureDetail, type CapturePlot } from '@earmark/contracts';
import { useDeferredValue, useMemo } from 'react';
import type uPlot from 'uplot';
import { ErrorState } from '@/components/error-state';
import { useCapturePlot } from '../api/get-capture-plot';
import type { CaptureView } from '../hooks/use-capture-view';
import { waveformYRange } from '../utils/plot-data';
import { SAMPLE_AXIS_TITLE, TIME_AXIS_TITLE } from '../utils/plot-titles';
import { pixelRatio, timeAxis, valueAxis } from '@/lib/plot/axes';
import { plotPalette } from '@/lib/plot/palette';
import { PanelCard } from './panel-card';
import { PlotCanvas } from './plot-canvas';
import { PlotSkeleton } from './plot-skeleton';

const HEIGHT = 170;

function waveformOptions(waveform: CapturePlot['waveform']): () => Omit<uPlot.Options, 'width' | 'height'> {
  const y = waveformYRange(waveform);
  return () => ({
    legend: { show: false },
    padding: [10, 18, 0, 0],
    cursor: { drag: { x: true, y: false, setScale: true }, points: { show: false }, y: false },
    scales: { x: { time: false }, y: { range: () => [y.min, y.max] } },
    axes: [
      timeAxis(TIME_AXIS_TITLE),
      valueAxis(SAMPLE_AXIS_TITLE),
    ],
    series: [
      {},
      { label: 'Max', stroke: plotPalette.ink700, width: 1, points: { show: false } },
      { label: 'Min', stroke: plotPalette.ink700, width: 1, points: { show: false } },
    ],
    bands: [{ series: [1, 2], fill: 'rgba(59, 63, 84, 0.55)' }],
    hooks: {
      draw: [
        (u) => {
          // Full scale: past these lines a fixed-point output would clip.
          const ctx = u.ctx;
          const ratio = pixelRatio();
          ctx.save();
          ctx.strokeStyle = plotPalette.fail;
          ctx.globalAlpha = 0.7;
          ctx.lineWidth = ratio;
          ctx.setLineDash([4 * ratio, 3 * ratio]);
          ctx.font = `${Math.round(10 * ratio)}px "JetBrains Mono", ui-monospace, monospace`;
          ctx.fillStyle = plotPalette.ink500;
          for (const level of [1, -1]) {
            const yPos = u.valToPos(level, 'y', true);
            ctx.beginPath();
            ctx.moveTo(u.bbox.left, yPos);
            ctx.lineTo(u.bbox.left + u.bbox.width, yPos);
            ctx.stroke();
            ctx.fillText(level > 0 ? '+1 FS' : '\u22121 FS', u.bbox.left + u.bbox.width - 40 * ratio, yPos + (level > 0 ? -4 : 12) * ratio);
          }
          ctx.restore();
        },
      ],
    },
  });
}

/** The capture's min/max envelope over time against the ±1 full-scale lines. */
export function WaveformPanel({ projectKey, captureId, detail, view }: { projectKey: string; captureId: string; detail: CaptureDetail; view: CaptureView }) {
  const plotQuery = useCapturePlot(projectKey, captureId, view.plotParams);
  // NOTE: deferred so the spectrum draws first.
  const waveform = useDeferredValue(plotQuery.data)?.waveform;
  const data = useMemo<uPlot.AlignedData | null>(() => (waveform ? [waveform.seconds, waveform.max, waveform.min] : null), [waveform]);
  const buildOptions = useMemo(() => (waveform ? waveformOptions(waveform) : null), [waveform]);
  const seconds = detail.capture.frames / detail.capture.sampleRate;

  return (
    <PanelCard
      title="Waveform"
      aside={
        <span className="font-mono text-xs text-ink-500">
          ch {view.channel} · {formatSeconds(seconds)} · {formatFrequency(detail.capture.sampleRate)} sampling
        </span>
      }
    >
      {plotQuery.isError && !plotQuery.data ? (
        <ErrorState error={plotQuery.error} onRetry={() => void plotQuery.refetch()} />
      ) : !data || !buildOptions ? (
        <PlotSkeleton height={HEIGHT} />
      ) : (waveform?.seconds.length ?? 0) < 2 ? (
        <p className="py-8 text-center text-sm text-ink-600">The capture holds no samples on this channel.</p>
      ) : (
        <PlotCanvas label="Waveform" height={HEIGHT} data={data} buildOptions={buildOptions} />
      )}
    </PanelCard>
  );
}
