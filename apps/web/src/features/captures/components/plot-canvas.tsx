import { useElementWidth } from '@/lib/use-element-width';
import 'uplot/dist/uPlot.min.css';
import { memo, useEffect, useRef, type KeyboardEvent, type ReactNode } from 'react';
import type uPlot from 'uplot';
import { cn } from '@/lib/cn';
import { clampLogRange, panLogRange, zoomLogRange, type FrequencyRange } from '@/lib/plot/log-frequency';

/**
 * The one place that owns a uPlot instance. Everything else hands it column data and an
 * options builder; tests replace this module, since uPlot needs a real canvas.
 *
 * The x range can be controlled (frequency plots share one zoom): the chart reports drags,
 * double-clicks and keyboard zooms through onXRangeChange and follows xRange when it changes.
 */
export type PlotCanvasProps = {
  /** Accessible name of the figure. */
  label: string;
  /** A sentence for screen readers saying what the plot shows (the numbers are in the page). */
  summary?: string;
  height: number;
  data: uPlot.AlignedData;
  /** Builds the chart's options; must be memoised, a new builder rebuilds the chart. */
  buildOptions: () => Omit<uPlot.Options, 'width' | 'height'>;
  /** Log-frequency x axis: enables keyboard and shift-drag panning/zooming on it. */
  logX?: boolean;
  xDomain?: FrequencyRange | null;
  xRange?: FrequencyRange | null;
  onXRangeChange?: (range: FrequencyRange | null) => void;
  /** Called after every draw, e.g. to position HTML labels over the canvas. */
  onDraw?: (chart: uPlot, overlayOffset: { left: number; top: number }) => void;
  onCursor?: (index: number | null) => void;
  onWidth?: (cssWidth: number) => void;
  /** Measures the time from `start` (performance.now()) to the first draw under this name. */
  timing?: { name: string; start: number };
  className?: string;
  children?: ReactNode;
};

type UPlotConstructor = typeof uPlot;
let uPlotLoad: Promise<UPlotConstructor> | null = null;

/**
 * NOTE: uPlot reads matchMedia as soon as it is evaluated, so it is loaded on demand; the
 * rest of the app stays importable where there is none (jsdom), and uPlot gets its own
 * chunk. The load starts with this module, so it is ready by the time a plot has data.
 */
function loadUPlot(): Promise<UPlotConstructor> | null {
  if (typeof window === 'undefined' || typeof window.matchMedia !== 'function') return null;
  uPlotLoad ??= import('uplot').then((module) => module.default);
  return uPlotLoad;
}
void loadUPlot();

type AxisText = { scale: string; title: string; ticks: string[] };

/** The axis with its tick labels recorded each time uPlot asks for them. */
function recordingAxis(axis: uPlot.Axis, index: number, into: Map<number, AxisText>): uPlot.Axis {
  const values = axis.values;
  const title = typeof axis.label === 'string' ? axis.label : '';
  if (typeof values !== 'function' || !title) return axis;
  return {
    ...axis,
    values: (u, splits, axisIdx, space, incr) => {
      const labels = values(u, splits, axisIdx, space, incr);
      into.set(index, { scale: axis.scale ?? (index === 0 ? 'x' : 'y'), title, ticks: labels.map((l) => String(l ?? '')).filter((l) => l !== '') });
      return labels;
    },
  };
}

function writeAxesText(host: HTMLElement, axes: Map<number, AxisText>) {
  const lines = [...axes.values()].map((a) => {
    const line = document.createElement('p');
    line.dataset.axis = a.scale;
    line.dataset.title = a.title;
    line.dataset.ticks = a.ticks.join('|');
    line.textContent = `${a.scale === 'x' ? 'Horizontal' : 'Vertical'} axis ${a.title}: ${a.ticks.join(', ')}`;
    return line;
  });
  host.replaceChildren(...lines);
}

function nearlyEqual(a: number | undefined, b: number): boolean {
  return a !== undefined && Math.abs(a - b) <= Math.abs(b) * 1e-6;
}

function PlotCanvasImpl({
  label,
  summary,
  height,
  data,
  buildOptions,
  logX = false,
  xDomain = null,
  xRange = null,
  onXRangeChange,
  onDraw,
  onCursor,
  onWidth,
  timing,
  className,
  children,
}: PlotCanvasProps) {
  const wrapperRef = useRef<HTMLDivElement>(null);
  const hostRef = useRef<HTMLDivElement>(null);
  const chartRef = useRef<uPlot | null>(null);
  const axesTextRef = useRef<HTMLDivElement>(null);

  // Latest callbacks and props, read by uPlot hooks without rebuilding the chart.
  const latest = useRef({ onXRangeChange, onDraw, onCursor, xDomain, xRange, timing, data });
  latest.current = { onXRangeChange, onDraw, onCursor, xDomain, xRange, timing, data };
  const measured = useRef(false);

  const width = useElementWidth(wrapperRef);

  useEffect(() => {
    if (width > 0) onWidth?.(width);
  }, [width, onWidth]);

  const applyRange = (chart: uPlot, range: FrequencyRange | null) => {
    const domain = latest.current.xDomain;
    const target = range ? (logX && domain ? clampLogRange(range, domain) : range) : domain;
    if (!target) return;
    const x = chart.scales.x;
    if (x && nearlyEqual(x.min, target.min) && nearlyEqual(x.max, target.max)) return;
    chart.setScale('x', target);
  };

  // Build (or rebuild) the chart when its options change; data updates go through setData.
  useEffect(() => {
    const host = hostRef.current;
    const loading = loadUPlot();
    if (!host || width <= 0 || !loading) return;
    let cancelled = false;
    let built: uPlot | null = null;
    void loading.then((UPlot) => {
      if (cancelled) return;
      const base = buildOptions();
      const axisText = new Map<number, AxisText>();
      const options: uPlot.Options = {
        ...base,
        axes: base.axes?.map((axis, index) => recordingAxis(axis, index, axisText)),
        width,
        height,
        hooks: {
          ...base.hooks,
          draw: [
            ...(base.hooks?.draw ?? []),
            (chart) => {
              if (axesTextRef.current) writeAxesText(axesTextRef.current, axisText);
              const wrapperRect = wrapperRef.current?.getBoundingClientRect();
              const overRect = chart.over.getBoundingClientRect();
              latest.current.onDraw?.(chart, {
                left: wrapperRect ? overRect.left - wrapperRect.left : 0,
                top: wrapperRect ? overRect.top - wrapperRect.top : 0,
              });
              const timingNow = latest.current.timing;
              if (timingNow && !measured.current) {
                measured.current = true;
                const end = performance.now();
                performance.measure(timingNow.name, { start: timingNow.start, end });
                performance.measure(`${timingNow.name}:construct`, { start: constructedAt, end });
              }
            },
          ],
          setScale: [
            ...(base.hooks?.setScale ?? []),
            (chart, key) => {
              if (key !== 'x') return;
              const { min, max } = chart.scales.x ?? {};
              if (min === undefined || max === undefined || min === null || max === null) return;
              const domain = latest.current.xDomain;
              const isFull = domain !== null && nearlyEqual(min, domain.min) && nearlyEqual(max, domain.max);
              latest.current.onXRangeChange?.(isFull ? null : { min, max });
            },
          ],
          setCursor: [
            ...(base.hooks?.setCursor ?? []),
            (chart) => {
              const index = chart.cursor.idx;
              latest.current.onCursor?.(index === undefined || index === null ? null : index);
            },
          ],
        },
      };
      const constructedAt = performance.now();
      const chart = new UPlot(options, latest.current.data, host);
      built = chart;
      chartRef.current = chart;
      if (latest.current.xRange) applyRange(chart, latest.current.xRange);
    });
    return () => {
      cancelled = true;
      built?.destroy();
      chartRef.current = null;
    };
    // data is applied by the effect below; width by setSize. Rebuilding on them would lose zoom.
  }, [buildOptions, height, width > 0]);

  useEffect(() => {
    const chart = chartRef.current;
    if (!chart || chart.data === data) return;
    chart.setData(data);
    applyRange(chart, latest.current.xRange);
  }, [data]);

  useEffect(() => {
    const chart = chartRef.current;
    if (chart && width > 0 && chart.width !== width) chart.setSize({ width, height });
  }, [width, height]);

  useEffect(() => {
    const chart = chartRef.current;
    if (chart) applyRange(chart, xRange);
  }, [xRange?.min, xRange?.max, xDomain?.min, xDomain?.max]);

  // Shift-drag pans a log-frequency plot; a plain drag still selects a range to zoom into.
  useEffect(() => {
    const wrapper = wrapperRef.current;
    if (!wrapper || !logX) return;
    const onPointerDown = (event: PointerEvent) => {
      const chart = chartRef.current;
      const domain = latest.current.xDomain;
      if (!event.shiftKey || !chart || !domain || event.button !== 0) return;
      if (!(event.target instanceof Node) || !chart.over.contains(event.target)) return;
      event.preventDefault();
      event.stopPropagation();
      const startX = event.clientX;
      const start = { min: chart.scales.x?.min ?? domain.min, max: chart.scales.x?.max ?? domain.max };
      const plotWidth = chart.over.clientWidth || 1;
      const onMove = (move: PointerEvent) => {
        chart.setScale('x', panLogRange(start, -(move.clientX - startX) / plotWidth, domain));
      };
      const onUp = () => {
        window.removeEventListener('pointermove', onMove);
        window.removeEventListener('pointerup', onUp);
      };
      window.addEventListener('pointermove', onMove);
      window.addEventListener('pointerup', onUp);
    };
    // Capture phase, so uPlot's own drag-to-select never sees a shift-drag.
    const onMouseDown = (event: MouseEvent) => {
      if (event.shiftKey) event.stopPropagation();
    };
    wrapper.addEventListener('pointerdown', onPointerDown, true);
    wrapper.addEventListener('mousedown', onMouseDown, true);
    return () => {
      wrapper.removeEventListener('pointerdown', onPointerDown, true);
      wrapper.removeEventListener('mousedown', onMouseDown, true);
    };
  }, [logX]);

  const onKeyDown = (event: KeyboardEvent<HTMLElement>) => {
    const chart = chartRef.current;
    const domain = xDomain;
    if (!logX || !chart || !domain || !onXRangeChange) return;
    const current = { min: chart.scales.x?.min ?? domain.min, max: chart.scales.x?.max ?? domain.max };
    let next: FrequencyRange | null | undefined;
    if (event.key === 'ArrowLeft') next = panLogRange(current, -0.2, domain);
    else if (event.key === 'ArrowRight') next = panLogRange(current, 0.2, domain);
    else if (event.key === '+' || event.key === '=') next = zoomLogRange(current, 0.5, domain);
    else if (event.key === '-' || event.key === '_') next = zoomLogRange(current, 2, domain);
    else if (event.key === '0' || event.key === 'Home' || event.key === 'Escape') next = null;
    if (next === undefined) return;
    event.preventDefault();
    // The chart's setScale hook reports the new range through onXRangeChange.
    applyRange(chart, next);
  };

  return (
    <figure
      aria-label={label}
      tabIndex={logX ? 0 : undefined}
      onKeyDown={onKeyDown}
      className={cn('relative m-0 rounded-md outline-offset-4', className)}
    >
      {summary ? <figcaption className="sr-only">{summary}</figcaption> : null}
      {/* What the canvas draws as text: each axis's title and tick labels, for screen readers and tests. */}
      <div ref={axesTextRef} className="sr-only" data-testid="plot-axes" />
      <div ref={wrapperRef} className="earmark-plot relative" style={{ minHeight: height }}>
        <div ref={hostRef} />
        {children}
      </div>
    </figure>
  );
}

export const PlotCanvas = memo(PlotCanvasImpl);
