import type { CaptureDetail, CapturePlot } from '@earmark/contracts';
import { useCallback, useMemo, useRef, useState } from 'react';
import type uPlot from 'uplot';
import { ErrorState } from '@/components/error-state';
import { useCapturePlot } from '../api/get-capture-plot';
import type { CaptureView } from '../hooks/use-capture-view';
import { worstPointLabel } from '../utils/check-format';
import { formatHz, plain, zoomLogRange } from '@/lib/plot/log-frequency';
import { allowedZone, failingSpans, limitValueAt, spectrumColumns, spectrumYRange, SPECTRUM_SERIES, type SpectrumColumns } from '../utils/plot-data';
import { frequencyAxes, logFrequencyScale, pixelRatio, tickDecimals, valueAxis } from '@/lib/plot/axes';
import { plotPalette } from '@/lib/plot/palette';
import { PanelCard, PlotToolbarButton } from './panel-card';
import { PlotCanvas } from './plot-canvas';

const PLOT_HEIGHT = 380;

/** Name under which the time from data arrival to the spectrum's first draw is measured. */
export const SPECTRUM_DRAW_MEASURE = 'earmark:spectrum:data-to-first-draw';

function hatchPattern(ctx: CanvasRenderingContext2D): CanvasPattern | string {
  const size = Math.round(8 * pixelRatio());
  const tile = document.createElement('canvas');
  tile.width = size;
  tile.height = size;
  const t = tile.getContext('2d');
  if (!t) return plotPalette.failFill;
  t.fillStyle = plotPalette.failFill;
  t.fillRect(0, 0, size, size);
  t.strokeStyle = plotPalette.failHatch;
  t.lineWidth = Math.max(1, pixelRatio());
  t.beginPath();
  t.moveTo(0, size);
  t.lineTo(size, 0);
  t.stroke();
  return ctx.createPattern(tile, 'repeat') ?? plotPalette.failFill;
}

function clipToPlot(u: uPlot) {
  const { left, top, width, height } = u.bbox;
  u.ctx.beginPath();
  u.ctx.rect(left, top, width, height);
  u.ctx.clip();
}

function drawLimit(u: uPlot, points: CapturePlot['upper']) {
  if (!points || points.length < 2) return;
  const ctx = u.ctx;
  ctx.beginPath();
  points.forEach((p, i) => {
    const x = u.valToPos(p.hz, 'x', true);
    const y = u.valToPos(p.db, 'y', true);
    if (i === 0) ctx.moveTo(x, y);
    else ctx.lineTo(x, y);
  });
  ctx.stroke();
}

type BuildArgs = { plot: CapturePlot; columns: SpectrumColumns; showOverlay: boolean; unit: string };

function buildSpectrumOptions({ plot, columns, showOverlay, unit }: BuildArgs): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => {
    let hatch: CanvasPattern | string | null = null;
    const zone = allowedZone(plot.upper, plot.lower);
    const hasOverlay = columns.overlayMax !== null;
    const series: uPlot.Series[] = [
      {},
      { label: 'Measured (max)', stroke: plotPalette.ink900, width: 1.25, points: { show: false } },
      { label: 'Measured (min)', stroke: plotPalette.ink900, width: 1.25, points: { show: false } },
    ];
    const bands: uPlot.Band[] = [{ series: [SPECTRUM_SERIES.max, SPECTRUM_SERIES.min], fill: plotPalette.measuredBand }];
    if (hasOverlay) {
      series.push(
        { label: 'Last pass (max)', stroke: plotPalette.overlayLine, width: 1, dash: [2, 3], show: showOverlay, points: { show: false } },
        { label: 'Last pass (min)', stroke: plotPalette.overlayLine, width: 1, dash: [2, 3], show: showOverlay, points: { show: false } },
      );
      bands.unshift({ series: [SPECTRUM_SERIES.overlayMax, SPECTRUM_SERIES.overlayMin], fill: plotPalette.overlayBand });
    }

    return {
      legend: { show: false },
      padding: [14, 18, 0, 0],
      cursor: {
        drag: { x: true, y: false, setScale: true },
        points: { show: false },
        y: false,
      },
      select: { show: true, left: 0, top: 0, width: 0, height: 0 },
      scales: {
        x: logFrequencyScale(columns.domain),
        y: {
          range: (u) => {
            // While uPlot re-ranges after an x zoom, the x series already holds the new
            // visible span but the x scale does not yet.
            const x = u.series[0];
            const visible =
              x?.min != null && x.max != null && x.max > x.min ? { min: x.min, max: x.max } : (columns.domain ?? { min: 20, max: 20000 });
            const range = spectrumYRange(columns, plot, visible, showOverlay);
            return [range.min, range.max];
          },
        },
      },
      axes: [...frequencyAxes(), valueAxis(unit === 'dBFS' ? 'Level (dBFS)' : 'Magnitude (dB)', tickDecimals)],
      series,
      bands,
      hooks: {
        drawClear: [
          (u) => {
            const ctx = u.ctx;
            const { top, height } = u.bbox;
            ctx.save();
            clipToPlot(u);
            if (zone.length >= 2) {
              ctx.fillStyle = plotPalette.allowedZone;
              ctx.beginPath();
              zone.forEach((p, i) => {
                const x = u.valToPos(p.hz, 'x', true);
                const y = u.valToPos(p.upper, 'y', true);
                if (i === 0) ctx.moveTo(x, y);
                else ctx.lineTo(x, y);
              });
              for (let i = zone.length - 1; i >= 0; i--) {
                const p = zone[i] as (typeof zone)[number];
                ctx.lineTo(u.valToPos(p.hz, 'x', true), u.valToPos(p.lower, 'y', true));
              }
              ctx.closePath();
              ctx.fill();
            }
            const xMin = u.scales.x?.min;
            const xMax = u.scales.x?.max;
            if (xMin != null && xMax != null) {
              hatch ??= hatchPattern(ctx);
              const strip = Math.round(3 * pixelRatio());
              for (const span of failingSpans(plot.failingRegions, { min: xMin, max: xMax })) {
                const x0 = u.valToPos(span.fromHz, 'x', true);
                // A region can be a single column: keep it at least 2 px wide so it shows.
                const x1 = Math.max(u.valToPos(span.toHz, 'x', true), x0 + 2 * pixelRatio());
                ctx.fillStyle = hatch;
                ctx.fillRect(x0, top, x1 - x0, height);
                ctx.fillStyle = plotPalette.fail;
                ctx.fillRect(x0, top, x1 - x0, strip);
              }
            }
            ctx.restore();
          },
        ],
        draw: [
          (u) => {
            const ctx = u.ctx;
            const ratio = pixelRatio();
            ctx.save();
            clipToPlot(u);
            ctx.strokeStyle = plotPalette.brass600;
            ctx.lineWidth = 1.5 * ratio;
            ctx.setLineDash([6 * ratio, 4 * ratio]);
            drawLimit(u, plot.upper);
            drawLimit(u, plot.lower);
            ctx.setLineDash([]);
            if (plot.worst) {
              const x = u.valToPos(plot.worst.hz, 'x', true);
              const y = u.valToPos(plot.worst.db, 'y', true);
              const half = 5 * ratio;
              ctx.strokeStyle = plotPalette.fail;
              ctx.lineWidth = 1 * ratio;
              ctx.beginPath();
              ctx.moveTo(x, y - half);
              ctx.lineTo(x, y - 22 * ratio);
              ctx.stroke();
              // The fail shape of docs/design.md: a square with a cross.
              ctx.fillStyle = plotPalette.fail;
              ctx.strokeStyle = plotPalette.paperRaised;
              ctx.lineWidth = 1.5 * ratio;
              ctx.fillRect(x - half, y - half, 2 * half, 2 * half);
              ctx.strokeRect(x - half, y - half, 2 * half, 2 * half);
              ctx.beginPath();
              ctx.moveTo(x - half * 0.45, y - half * 0.45);
              ctx.lineTo(x + half * 0.45, y + half * 0.45);
              ctx.moveTo(x + half * 0.45, y - half * 0.45);
              ctx.lineTo(x - half * 0.45, y + half * 0.45);
              ctx.stroke();
            }
            ctx.restore();
          },
        ],
      },
    };
  };
}

function LegendSwatch({ kind }: { kind: 'measured' | 'overlay' | 'limit' | 'zone' | 'failing' | 'worst' }) {
  switch (kind) {
    case 'measured':
      return (
        <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
          <rect x="0" y="3" width="24" height="6" fill={plotPalette.measuredBand} />
          <path d="M0 3h24M0 9h24" stroke={plotPalette.ink900} strokeWidth="1.25" />
        </svg>
      );
    case 'overlay':
      return (
        <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
          <rect x="0" y="3" width="24" height="6" fill={plotPalette.overlayBand} />
          <path d="M0 3h24M0 9h24" stroke={plotPalette.overlayLine} strokeWidth="1" strokeDasharray="2 3" />
        </svg>
      );
    case 'limit':
      return (
        <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
          <path d="M0 6h24" stroke={plotPalette.brass600} strokeWidth="1.5" strokeDasharray="6 4" />
        </svg>
      );
    case 'zone':
      return (
        <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
          <rect x="0" y="1" width="24" height="10" fill={plotPalette.allowedZone} stroke={plotPalette.brass400} strokeOpacity="0.4" />
        </svg>
      );
    case 'failing':
      return (
        <svg viewBox="0 0 24 12" aria-hidden="true" className="h-3 w-6">
          <defs>
            <pattern id="em-legend-hatch" width="4" height="4" patternUnits="userSpaceOnUse">
              <rect width="4" height="4" fill={plotPalette.failFill} />
              <path d="M0 4 4 0" stroke={plotPalette.failHatch} strokeWidth="1" />
            </pattern>
          </defs>
          <rect x="0" y="0" width="24" height="12" fill="url(#em-legend-hatch)" />
          <rect x="0" y="0" width="24" height="2" fill={plotPalette.fail} />
        </svg>
      );
    case 'worst':
      return (
        <svg viewBox="0 0 12 12" aria-hidden="true" className="size-3">
          <rect x="0.5" y="0.5" width="11" height="11" rx="1" fill={plotPalette.fail} />
          <path d="m3.8 3.8 4.4 4.4m0-4.4-4.4 4.4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
        </svg>
      );
  }
}

function Readout({ plot, columns, index, showOverlay, unit }: { plot: CapturePlot; columns: SpectrumColumns; index: number | null; showOverlay: boolean; unit: string }) {
  const hz = index === null ? undefined : columns.hz[index];
  if (hz === undefined) {
    return <span className="text-ink-500">Point at the plot to read values at a frequency.</span>;
  }
  const range = (lo: number | null | undefined, hi: number | null | undefined) =>
    lo == null || hi == null ? '—' : Math.abs(hi - lo) < 0.005 ? `${plain(hi, 2)} ${unit}` : `${plain(lo, 2)} … ${plain(hi, 2)} ${unit}`;
  const upper = limitValueAt(plot.upper, hz);
  const lower = limitValueAt(plot.lower, hz);
  return (
    <span className="flex flex-wrap gap-x-4 gap-y-1">
      <span className="font-medium text-ink-950">{formatHz(hz)}</span>
      <span>
        <span className="text-ink-500">measured </span>
        {range(columns.min[index as number], columns.max[index as number])}
      </span>
      {upper !== null ? (
        <span>
          <span className="text-ink-500">upper </span>
          {plain(upper, 2)} {unit}
        </span>
      ) : null}
      {lower !== null ? (
        <span>
          <span className="text-ink-500">lower </span>
          {plain(lower, 2)} {unit}
        </span>
      ) : null}
      {showOverlay && columns.overlayMax ? (
        <span>
          <span className="text-ink-500">last pass </span>
          {range(columns.overlayMin?.[index as number], columns.overlayMax[index as number])}
        </span>
      ) : null}
    </span>
  );
}

function ChannelPicker({ channels, value, onChange }: { channels: number; value: number; onChange: (channel: number) => void }) {
  if (channels <= 1) return null;
  return (
    <div role="radiogroup" aria-label="Channel" className="inline-flex rounded-md border border-line-strong bg-paper-raised p-0.5">
      {Array.from({ length: channels }, (_, channel) => (
        <button
          key={channel}
          type="button"
          role="radio"
          aria-checked={value === channel}
          onClick={() => onChange(channel)}
          className={
            value === channel
              ? 'h-7 rounded-[5px] bg-ink-900 px-2.5 font-mono text-xs text-paper'
              : 'h-7 rounded-[5px] px-2.5 font-mono text-xs text-ink-700 hover:bg-ink-900/5'
          }
        >
          Ch {channel}
        </button>
      ))}
    </div>
  );
}

export function SpectrumPanel({ projectKey, captureId, detail, view }: { projectKey: string; captureId: string; detail: CaptureDetail; view: CaptureView }) {
  const plotQuery = useCapturePlot(projectKey, captureId, view.plotParams);
  const plot = plotQuery.data;
  const [cursor, setCursor] = useState<number | null>(null);
  const labelRef = useRef<HTMLDivElement>(null);

  // Prepared once per response; the timestamp starts the data-to-first-draw measurement.
  const prepared = useMemo(() => {
    if (!plot) return null;
    const start = performance.now();
    const columns = spectrumColumns(plot);
    const data: uPlot.AlignedData = columns.overlayMax
      ? [columns.hz, columns.max, columns.min, columns.overlayMax, columns.overlayMin ?? []]
      : [columns.hz, columns.max, columns.min];
    return { plot, columns, data, timing: { name: SPECTRUM_DRAW_MEASURE, start } };
  }, [plot]);

  const unit = plot?.unit ?? 'dB';
  const buildOptions = useMemo(
    () => (prepared ? buildSpectrumOptions({ plot: prepared.plot, columns: prepared.columns, showOverlay: view.showOverlay, unit }) : null),
    [prepared, view.showOverlay, unit],
  );

  const worst = plot?.worst ?? null;
  const onDraw = useCallback(
    (u: uPlot, offset: { left: number; top: number }) => {
      const label = labelRef.current;
      if (!label || !worst) return;
      const x = u.valToPos(worst.hz, 'x');
      const y = u.valToPos(worst.db, 'y');
      const inside = x >= 0 && x <= u.over.clientWidth && y >= 0 && y <= u.over.clientHeight;
      label.style.visibility = inside ? 'visible' : 'hidden';
      const flip = x > u.over.clientWidth - 200;
      label.style.left = `${offset.left + x + (flip ? -8 : 8)}px`;
      label.style.top = `${offset.top + Math.max(y - 34, 2)}px`;
      label.style.transform = flip ? 'translateX(-100%)' : 'none';
    },
    [worst],
  );

  const domain = prepared?.columns.domain ?? null;
  const zoomBy = (factor: number) => {
    if (!domain) return;
    view.setFrequencyRange(zoomLogRange(view.frequencyRange ?? domain, factor, domain));
  };
  const overlaySha = plot?.overlay?.buildSha ?? detail.lastPassing?.buildSha ?? null;
  const hasOverlay = prepared?.columns.overlayMax != null;

  return (
    <PanelCard
      id="spectrum"
      title="Spectrum"
      sectionRef={view.spectrumRef}
      aside={
        worst ? (
          <span className="font-mono text-xs text-ink-700">
            Worst point <span className="font-medium text-fail">{worstPointLabel(worst, unit).replace(' margin', '')}</span>
          </span>
        ) : plot && plot.checkId === null ? (
          <span className="text-xs text-ink-500">No magnitude-envelope check in this mask</span>
        ) : null
      }
      toolbar={
        <>
          <ChannelPicker channels={detail.capture.channels} value={view.channel} onChange={view.setChannel} />
          <label className="inline-flex h-8 items-center gap-2 rounded-md border border-line-strong bg-paper-raised px-2.5 text-xs text-ink-800 has-[:disabled]:text-ink-400">
            <input
              type="checkbox"
              className="size-3.5 accent-ink-900"
              checked={view.showOverlay && hasOverlay}
              disabled={!hasOverlay}
              onChange={(event) => view.setShowOverlay(event.target.checked)}
            />
            {overlaySha ? (
              <span>
                Compare with last pass <span className="font-mono">{overlaySha.slice(0, 7)}</span>
              </span>
            ) : (
              <span>No earlier passing build</span>
            )}
          </label>
          <span className="ml-auto inline-flex gap-1">
            <PlotToolbarButton label="Zoom in" onClick={() => zoomBy(0.5)} disabled={!domain}>
              <path d="M7 4v6M4 7h6" />
              <circle cx="7" cy="7" r="4.8" />
              <path d="m10.6 10.6 3 3" />
            </PlotToolbarButton>
            <PlotToolbarButton label="Zoom out" onClick={() => zoomBy(2)} disabled={!domain || view.frequencyRange === null}>
              <path d="M4 7h6" />
              <circle cx="7" cy="7" r="4.8" />
              <path d="m10.6 10.6 3 3" />
            </PlotToolbarButton>
            <PlotToolbarButton label="Reset zoom" onClick={() => view.setFrequencyRange(null)} disabled={view.frequencyRange === null}>
              <path d="M3 8a5 5 0 1 0 1.6-3.7" />
              <path d="M3 2.5v3h3" />
            </PlotToolbarButton>
          </span>
        </>
      }
    >
      {plotQuery.isError && !plot ? (
        <ErrorState error={plotQuery.error} onRetry={() => void plotQuery.refetch()} />
      ) : (
        <SpectrumBody
          width={view.setPlotWidth}
          prepared={prepared}
          buildOptions={buildOptions}
          view={view}
          onDraw={onDraw}
          onCursor={setCursor}
          labelRef={labelRef}
          worst={worst}
          unit={unit}
        />
      )}
      {prepared ? (
        <div className="mt-3 space-y-2 border-t border-line pt-3">
          <ul aria-label="Legend" className="flex flex-wrap items-center gap-x-5 gap-y-1.5 text-xs text-ink-700">
            <li className="inline-flex items-center gap-1.5">
              <LegendSwatch kind="measured" />
              Measured, ch {prepared.plot.channel} (min/max per column)
            </li>
            {prepared.plot.upper ? (
              <li className="inline-flex items-center gap-1.5">
                <LegendSwatch kind="limit" />
                Upper limit
              </li>
            ) : null}
            {prepared.plot.lower ? (
              <li className="inline-flex items-center gap-1.5">
                <LegendSwatch kind="limit" />
                Lower limit
              </li>
            ) : null}
            {prepared.plot.upper && prepared.plot.lower ? (
              <li className="inline-flex items-center gap-1.5">
                <LegendSwatch kind="zone" />
                Allowed zone
              </li>
            ) : null}
            {prepared.plot.failingRegions.length > 0 ? (
              <li className="inline-flex items-center gap-1.5">
                <LegendSwatch kind="failing" />
                Failing region{prepared.plot.failingRegions.length > 1 ? `s (${prepared.plot.failingRegions.length})` : ''}
              </li>
            ) : null}
            {worst ? (
              <li className="inline-flex items-center gap-1.5">
                <LegendSwatch kind="worst" />
                Worst point
              </li>
            ) : null}
            {hasOverlay && view.showOverlay ? (
              <li className="inline-flex items-center gap-1.5">
                <LegendSwatch kind="overlay" />
                Last pass <span className="font-mono">{overlaySha?.slice(0, 7)}</span>
              </li>
            ) : null}
          </ul>
          <p aria-live="off" className="min-h-5 font-mono text-xs tabular-nums text-ink-800">
            <Readout plot={prepared.plot} columns={prepared.columns} index={cursor} showOverlay={view.showOverlay} unit={unit} />
          </p>
          <p className="text-[11px] text-ink-500">
            Drag across the plot to zoom, shift-drag to pan, double-click to see everything. With the plot focused: ← → pan, + − zoom, 0 resets.
            {prepared.plot.checkId ? (
              <>
                {' '}
                Limits of check <span className="font-mono">{prepared.plot.checkId}</span>.
              </>
            ) : null}
          </p>
        </div>
      ) : null}
    </PanelCard>
  );
}

type BodyProps = {
  width: (cssWidth: number) => void;
  prepared: { columns: SpectrumColumns; data: uPlot.AlignedData; plot: CapturePlot; timing: { name: string; start: number } } | null;
  buildOptions: (() => Omit<uPlot.Options, 'width' | 'height'>) | null;
  view: CaptureView;
  onDraw: (u: uPlot, offset: { left: number; top: number }) => void;
  onCursor: (index: number | null) => void;
  labelRef: React.RefObject<HTMLDivElement | null>;
  worst: CapturePlot['worst'];
  unit: string;
};

/** Always mounted (even while loading) so its width decides the resolution asked for. */
function SpectrumBody({ width, prepared, buildOptions, view, onDraw, onCursor, labelRef, worst, unit }: BodyProps) {
  if (!prepared || !buildOptions) {
    return <MeasureWidth onWidth={width} height={PLOT_HEIGHT} />;
  }
  if (prepared.columns.hz.length < 2) {
    return (
      <div className="grid place-items-center rounded-md border border-dashed border-line-strong text-sm text-ink-600" style={{ height: PLOT_HEIGHT }}>
        The analysis produced no spectrum for this channel.
      </div>
    );
  }
  const summary = worst
    ? `Measured response against the mask; worst point ${worstPointLabel(worst, unit)}.`
    : 'Measured response against the mask.';
  return (
    <PlotCanvas
      label="Spectrum plot"
      summary={summary}
      height={PLOT_HEIGHT}
      data={prepared.data}
      buildOptions={buildOptions}
      logX
      xDomain={prepared.columns.domain}
      xRange={view.frequencyRange}
      onXRangeChange={view.setFrequencyRange}
      onDraw={onDraw}
      onCursor={onCursor}
      onWidth={width}
      timing={prepared.timing}
    >
      {worst ? (
        <div
          ref={labelRef}
          data-testid="worst-point-label"
          className="pointer-events-none absolute left-0 top-0 z-10 whitespace-nowrap rounded border border-fail/40 bg-paper-raised/95 px-1.5 py-0.5 font-mono text-[11px] font-medium text-fail shadow-sm"
        >
          {worstPointLabel(worst, unit)}
        </div>
      ) : null}
    </PlotCanvas>
  );
}

/** Placeholder of the plot's size that reports its width, so the first request fits the screen. */
export function MeasureWidth({ onWidth, height }: { onWidth?: (width: number) => void; height: number }) {
  const ref = useCallback(
    (node: HTMLDivElement | null) => {
      if (!node || !onWidth) return;
      // Without ResizeObserver (old browsers, jsdom) one reading at mount will do.
      if (typeof ResizeObserver === 'undefined') {
        onWidth(node.clientWidth || 960);
        return;
      }
      const observer = new ResizeObserver((entries) => {
        const w = Math.floor(entries[0]?.contentRect.width ?? 0);
        if (w > 0) onWidth(w);
      });
      observer.observe(node);
      return () => observer.disconnect();
    },
    [onWidth],
  );
  return (
    <div ref={ref} aria-busy="true" aria-label="Loading plot" role="img">
      <div className="w-full animate-pulse rounded-md bg-ink-900/[0.05]" style={{ height }} />
    </div>
  );
}

