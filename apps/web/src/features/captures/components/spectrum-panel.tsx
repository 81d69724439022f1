import { formatFrequency, formatNumberIn, formatQuantity, type CaptureDetail, type CapturePlot } from '@earmark/contracts';
import { useCallback, useMemo, useRef, useState } from 'react';
import type uPlot from 'uplot';
import { ErrorState } from '@/components/error-state';
import { useCapturePlot } from '../api/get-capture-plot';
import type { CaptureView } from '../hooks/use-capture-view';
import { checkKindLabel, formatMargin, worstPointLabel } from '../utils/check-format';
import { zoomLogRange } from '@/lib/plot/log-frequency';
import { Button } from '@/components/button';
import { notify } from '@/components/toast';
import { saveBlob } from '@/lib/download';
import { captureFileStem } from '../api/download-capture';
import { bandAt, bandSteps, type StepPoint } from '../utils/band-steps';
import { curvesCsv } from '../utils/curves-csv';
import { spectralChoices, worstChannelOf, type SpectralChoice } from '../utils/plot-selection';
import { meaningOfPlot, spectrumAxisTitle, spectrumDescription, spectrumPanelTitle, type SpectrumMeaning } from '../utils/plot-titles';
import { allowedZone, failingSpans, limitValueAt, spectrumColumns, spectrumYRange, SPECTRUM_SERIES, type SpectrumColumns } from '../utils/plot-data';
import { frequencyAxes, logFrequencyScale, pixelRatio, valueAxis } from '@/lib/plot/axes';
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

/** How each mask line is drawn, on the canvas and in the legend alike, so every legend entry matches one look. */
export const LINE_STYLES = {
  upper: { color: plotPalette.brass600, dash: [6, 4], width: 1.5 },
  lower: { color: plotPalette.lowerLimit, dash: [10, 3, 2, 3], width: 1.5 },
  band: { color: plotPalette.bandLevel, dash: [], width: 2.25 },
  overlay: { color: plotPalette.overlayLine, dash: [5, 3], width: 1.25 },
  measured: { color: plotPalette.ink900, dash: [], width: 1.25 },
} as const;
type LineStyle = (typeof LINE_STYLES)[keyof typeof LINE_STYLES];

function strokeStyle(ctx: CanvasRenderingContext2D, style: LineStyle, ratio: number) {
  ctx.strokeStyle = style.color;
  ctx.lineWidth = style.width * ratio;
  ctx.setLineDash(style.dash.map((d) => d * ratio));
}

function drawSteps(u: uPlot, lines: StepPoint[][]) {
  const ctx = u.ctx;
  for (const line of lines) {
    ctx.beginPath();
    line.forEach((p, i) => {
      const x = u.valToPos(p.hz, 'x', true);
      const y = u.valToPos(p.value, 'y', true);
      if (i === 0) ctx.moveTo(x, y);
      else ctx.lineTo(x, y);
    });
    ctx.stroke();
  }
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

type BuildArgs = { plot: CapturePlot; columns: SpectrumColumns; showOverlay: boolean; axisTitle: string };

function buildSpectrumOptions({ plot, columns, showOverlay, axisTitle }: BuildArgs): () => Omit<uPlot.Options, 'width' | 'height'> {
  return () => {
    let hatch: CanvasPattern | string | null = null;
    const zone = allowedZone(plot.upper, plot.lower);
    const plotBands = plot.bands ?? null;
    const steps = plotBands ? { measured: bandSteps(plotBands, 'measured'), max: bandSteps(plotBands, 'max'), min: bandSteps(plotBands, 'min') } : null;
    const hasOverlay = columns.overlayMax !== null;
    const series: uPlot.Series[] = [
      {},
      { label: 'Measured (max)', stroke: LINE_STYLES.measured.color, width: LINE_STYLES.measured.width, points: { show: false } },
      { label: 'Measured (min)', stroke: LINE_STYLES.measured.color, width: LINE_STYLES.measured.width, points: { show: false } },
    ];
    const bands: uPlot.Band[] = [{ series: [SPECTRUM_SERIES.max, SPECTRUM_SERIES.min], fill: plotPalette.measuredBand }];
    if (hasOverlay) {
      series.push(
        { label: 'Last pass (max)', stroke: LINE_STYLES.overlay.color, width: LINE_STYLES.overlay.width, dash: [...LINE_STYLES.overlay.dash], show: showOverlay, points: { show: false } },
        { label: 'Last pass (min)', stroke: LINE_STYLES.overlay.color, width: LINE_STYLES.overlay.width, dash: [...LINE_STYLES.overlay.dash], show: showOverlay, points: { show: false } },
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
      axes: [...frequencyAxes(), valueAxis(axisTitle)],
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
            strokeStyle(ctx, LINE_STYLES.upper, ratio);
            drawLimit(u, plot.upper);
            if (steps) drawSteps(u, steps.max);
            strokeStyle(ctx, LINE_STYLES.lower, ratio);
            drawLimit(u, plot.lower);
            if (steps) drawSteps(u, steps.min);
            if (steps) {
              strokeStyle(ctx, LINE_STYLES.band, ratio);
              drawSteps(u, steps.measured);
            }
            ctx.setLineDash([]);
            if (plot.worst) {
              const x = Math.min(Math.max(u.valToPos(plot.worst.hz, 'x', true), u.bbox.left), u.bbox.left + u.bbox.width);
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

type SwatchKind = 'measured' | 'overlay' | 'upper' | 'lower' | 'band' | 'zone' | 'failing' | 'worst';

function LineSwatch({ style }: { style: LineStyle }) {
  return <path d="M0 6h24" stroke={style.color} strokeWidth={style.width} strokeDasharray={style.dash.length ? style.dash.join(' ') : undefined} />;
}

/** Each legend entry's look; `data-swatch` names it, so a test can tell the entries apart without pixels. */
function LegendSwatch({ kind }: { kind: SwatchKind }) {
  const svg = (children: React.ReactNode, viewBox = '0 0 24 12', className = 'h-3 w-6') => (
    <svg viewBox={viewBox} aria-hidden="true" className={className} data-swatch={kind}>
      {children}
    </svg>
  );
  switch (kind) {
    case 'measured':
      return svg(
        <>
          <rect x="0" y="3" width="24" height="6" fill={plotPalette.measuredBand} />
          <path d="M0 3h24M0 9h24" stroke={LINE_STYLES.measured.color} strokeWidth={LINE_STYLES.measured.width} />
        </>,
      );
    case 'overlay':
      return svg(
        <>
          <rect x="0" y="3" width="24" height="6" fill={plotPalette.overlayBand} />
          <path d="M0 3h24M0 9h24" stroke={LINE_STYLES.overlay.color} strokeWidth={LINE_STYLES.overlay.width} strokeDasharray={LINE_STYLES.overlay.dash.join(' ')} />
        </>,
      );
    case 'upper':
      return svg(<LineSwatch style={LINE_STYLES.upper} />);
    case 'lower':
      return svg(<LineSwatch style={LINE_STYLES.lower} />);
    case 'band':
      return svg(<path d="M0 9h8V3h8v4h8" fill="none" stroke={LINE_STYLES.band.color} strokeWidth={LINE_STYLES.band.width} />);
    case 'zone':
      return svg(<rect x="0" y="1" width="24" height="10" fill={plotPalette.allowedZone} stroke={plotPalette.brass400} strokeOpacity="0.4" />);
    case 'failing':
      return svg(
        <>
          <defs>
            <pattern id="em-legend-hatch" width="4" height="4" patternUnits="userSpaceOnUse">
              <rect width="4" height="4" fill={plotPalette.failFill} />
              <path d="M0 4 4 0" stroke={plotPalette.failHatch} strokeWidth="1" />
            </pattern>
          </defs>
          <rect x="0" y="0" width="24" height="12" fill="url(#em-legend-hatch)" />
          <rect x="0" y="0" width="24" height="2" fill={plotPalette.fail} />
        </>,
      );
    case 'worst':
      return svg(
        <>
          <rect x="0.5" y="0.5" width="11" height="11" rx="1" fill={plotPalette.fail} />
          <path d="m3.8 3.8 4.4 4.4m0-4.4-4.4 4.4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
        </>,
        '0 0 12 12',
        'size-3',
      );
  }
}

function LegendEntry({ kind, children }: { kind: SwatchKind; children: React.ReactNode }) {
  return (
    <li className="inline-flex items-center gap-1.5" data-legend={kind}>
      <LegendSwatch kind={kind} />
      <span>{children}</span>
    </li>
  );
}

function Readout({ plot, columns, index, showOverlay, unit }: { plot: CapturePlot; columns: SpectrumColumns; index: number | null; showOverlay: boolean; unit: string }) {
  const hz = index === null ? undefined : columns.hz[index];
  if (hz === undefined) {
    return <span className="text-ink-500">Point at the plot to read values at a frequency.</span>;
  }
  const range = (lo: number | null | undefined, hi: number | null | undefined) => {
    if (lo == null || hi == null) return formatQuantity(null, unit);
    const low = formatQuantity(lo, unit);
    const high = formatQuantity(hi, unit);
    // Equal once rounded: one value says it.
    return low === high ? high : `${formatNumberIn(lo, unit)} … ${high}`;
  };
  const band = bandAt(plot.bands, hz);
  const upper = plot.bands ? (band?.max ?? null) : limitValueAt(plot.upper, hz);
  const lower = plot.bands ? (band?.min ?? null) : limitValueAt(plot.lower, hz);
  return (
    <span className="flex flex-wrap gap-x-4 gap-y-1">
      <span className="font-medium text-ink-950">{formatFrequency(hz)}</span>
      <span>
        <span className="text-ink-500">measured </span>
        {range(columns.min[index as number], columns.max[index as number])}
      </span>
      {band ? (
        <span>
          <span className="text-ink-500">band {formatFrequency(band.nominalHz)} </span>
          {band.measured !== null ? formatQuantity(band.measured, unit) : (band.error ?? formatQuantity(null, unit))}
        </span>
      ) : null}
      {upper !== null ? (
        <span>
          <span className="text-ink-500">upper </span>
          {formatQuantity(upper, unit)}
        </span>
      ) : null}
      {lower !== null ? (
        <span>
          <span className="text-ink-500">lower </span>
          {formatQuantity(lower, unit)}
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

function choiceLabel({ check, result }: SpectralChoice, unit: string | null): string {
  const status = !result ? 'not judged' : result.error ? 'could not be evaluated' : result.pass ? 'pass' : result.waiver ? 'fail, waived' : 'fail';
  const margin = result && result.margin !== null ? `, ${formatMargin(result.margin, result.unit ?? unit)}` : '';
  const channel = result && typeof result.channel === 'number' ? `, worst on ch ${result.channel}` : '';
  return `${check.id} · ${checkKindLabel(check.kind)} · ${status}${margin}${channel}`;
}

/** Which spectral check's limits are drawn; choosing one also moves to its worst channel. */
function CheckPicker({ choices, value, onChange, detail }: { choices: SpectralChoice[]; value: string | null; onChange: (checkId: string, channel: number) => void; detail: CaptureDetail }) {
  if (choices.length === 0) return null;
  return (
    <label className="inline-flex min-w-0 max-w-full items-center gap-2 text-xs text-ink-700">
      <span className="shrink-0 font-medium">Check</span>
      <select
        value={value ?? ''}
        onChange={(event) => {
          const choice = choices.find((c) => c.check.id === event.target.value);
          if (choice) onChange(choice.check.id, worstChannelOf(choice, detail));
        }}
        className="h-8 min-w-0 max-w-full truncate rounded-md border border-line-strong bg-paper-raised px-2 font-mono text-xs text-ink-900 sm:max-w-[30rem]"
      >
        {choices.map((choice) => (
          <option key={choice.check.id} value={choice.check.id}>
            {choiceLabel(choice, null)}
          </option>
        ))}
      </select>
    </label>
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

/** Warnings the engine raised for the check drawn, beside its plot (the checks table lists every check's). */
function CheckWarnings({ choice }: { choice: SpectralChoice | undefined }) {
  const warnings = choice?.result?.warnings ?? [];
  if (!choice || warnings.length === 0) return null;
  return (
    <ul aria-label={`Warnings for ${choice.check.id}`} className="space-y-0.5 text-xs text-brass-800">
      {warnings.map((w) => (
        <li key={w} className="flex gap-1.5">
          <span aria-hidden="true">⚠</span>
          <span className="break-words">{w}</span>
        </li>
      ))}
    </ul>
  );
}

/** The fallback meaning before the plot arrives: the chosen check's measure, else what the stimulus allows. */
function expectedMeaning(choice: SpectralChoice | undefined, detail: CaptureDetail): SpectrumMeaning {
  const measure = choice?.check.measure ?? (detail.testCase.stimulusKind === 'silence' ? 'level' : 'transfer');
  const reference = choice?.check.referenceHz;
  return { measure, normalisedAtHz: measure === 'transfer' ? (reference === undefined ? 1000 : reference) : null };
}

export function SpectrumPanel({ projectKey, captureId, detail, view }: { projectKey: string; captureId: string; detail: CaptureDetail; view: CaptureView }) {
  const plotQuery = useCapturePlot(projectKey, captureId, view.plotParams);
  const plot = plotQuery.data;
  const [cursor, setCursor] = useState<number | null>(null);
  const labelRef = useRef<HTMLDivElement>(null);
  const choices = useMemo(() => spectralChoices(detail), [detail]);
  const chosen = choices.find((c) => c.check.id === (plot?.checkId ?? view.checkId));
  const meaning = plot ? meaningOfPlot(plot) : expectedMeaning(chosen, detail);
  const axisTitle = spectrumAxisTitle(meaning);

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
    () => (prepared ? buildSpectrumOptions({ plot: prepared.plot, columns: prepared.columns, showOverlay: view.showOverlay, axisTitle }) : null),
    [prepared, view.showOverlay, axisTitle],
  );

  const worst = plot?.worst ?? null;
  const onDraw = useCallback(
    (u: uPlot, offset: { left: number; top: number }) => {
      const label = labelRef.current;
      if (!label || !worst) return;
      // A worst point on the last measured frequency sits a hair past the last column's centre: keep it on the edge.
      const edge = 3;
      const rawX = u.valToPos(worst.hz, 'x');
      const x = Math.min(Math.max(rawX, 0), u.over.clientWidth);
      const y = u.valToPos(worst.db, 'y');
      const inside = rawX >= -edge && rawX <= u.over.clientWidth + edge && y >= 0 && y <= u.over.clientHeight;
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

  const downloadCsv = () => {
    if (!plot) return;
    const { csv, rows } = curvesCsv(plot, { includeOverlay: view.showOverlay });
    const filename = `${captureFileStem(detail)}_${plot.checkId ?? 'spectrum'}_ch${plot.channel}.csv`;
    saveBlob(new Blob([csv], { type: 'text/csv' }), filename);
    notify.success('Curves downloaded', `${filename}: ${rows} rows, values in ${unit}.`);
  };

  return (
    <PanelCard
      id="spectrum"
      title={spectrumPanelTitle(meaning)}
      sectionRef={view.spectrumRef}
      aside={
        worst ? (
          <span className="font-mono text-xs text-ink-700">
            Worst point <span className="font-medium text-fail">{worstPointLabel(worst, unit).replace(' margin', '')}</span>
          </span>
        ) : plot && plot.checkId === null ? (
          <span className="text-xs text-ink-500">No spectral check in this mask</span>
        ) : plot ? (
          <span className="text-xs text-ink-500">No failing region on ch {plot.channel}</span>
        ) : null
      }
      toolbar={
        <>
          <CheckPicker choices={choices} value={view.checkId} onChange={view.setCheck} detail={detail} />
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
            <Button variant="secondary" className="h-8 px-2.5 text-xs" onClick={downloadCsv} disabled={!plot}>
              Download curves (CSV)
            </Button>
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
            <LegendEntry kind="measured">Measured, ch {prepared.plot.channel} (min/max per column)</LegendEntry>
            {prepared.plot.bands ? <LegendEntry kind="band">Band level (1/{(chosen?.check.kind === 'band-levels' && chosen.check.fraction) || 3} octave)</LegendEntry> : null}
            {prepared.plot.upper || prepared.plot.bands?.some((b) => b.max !== null) ? <LegendEntry kind="upper">Upper limit</LegendEntry> : null}
            {prepared.plot.lower || prepared.plot.bands?.some((b) => b.min !== null) ? <LegendEntry kind="lower">Lower limit</LegendEntry> : null}
            {prepared.plot.upper && prepared.plot.lower ? <LegendEntry kind="zone">Allowed zone</LegendEntry> : null}
            {prepared.plot.failingRegions.length > 0 ? (
              <LegendEntry kind="failing">
                {prepared.plot.bands ? 'Failing band' : 'Failing region'}
                {prepared.plot.failingRegions.length > 1 ? `s (${prepared.plot.failingRegions.length})` : ''}
              </LegendEntry>
            ) : null}
            {worst ? <LegendEntry kind="worst">Worst point</LegendEntry> : null}
            {hasOverlay && view.showOverlay ? (
              <LegendEntry kind="overlay">
                Last pass <span className="font-mono">{overlaySha?.slice(0, 7)}</span> (dashed)
              </LegendEntry>
            ) : null}
          </ul>
          <CheckWarnings choice={chosen} />
          <p aria-live="off" data-testid="plot-readout" className="min-h-5 font-mono text-xs tabular-nums text-ink-800">
            <Readout plot={prepared.plot} columns={prepared.columns} index={cursor} showOverlay={view.showOverlay} unit={unit} />
          </p>
          <p className="text-[11px] text-ink-500">
            The curve is {spectrumDescription(meaning)}.
            {prepared.plot.checkId ? (
              <>
                {' '}
                Limits of check <span className="font-mono">{prepared.plot.checkId}</span>.
              </>
            ) : null}{' '}
            Drag across the plot to zoom, shift-drag to pan, double-click to see everything. With the plot focused: ← → pan, + − zoom, 0 resets.
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

