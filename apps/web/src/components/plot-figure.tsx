import { useElementWidth } from '@/lib/use-element-width';
import 'uplot/dist/uPlot.min.css';
import { useEffect, useRef, type ReactNode } from 'react';
import type uPlot from 'uplot';
import { cn } from '@/lib/cn';

/**
 * A named figure holding one uPlot chart, for plots outside the capture page (mask
 * previews, derived bands). It owns the chart's life: built when the options builder
 * changes, fed through setData when only the data does (so editing a limit redraws without
 * rebuilding), resized with its container. Tests replace this module: uPlot needs a canvas.
 */
export type PlotFigureProps = {
  /** Accessible name of the figure. */
  label: string;
  /** A sentence for screen readers saying what the plot shows. */
  summary?: string;
  height: number;
  data: uPlot.AlignedData;
  /** Must be memoised: a new builder rebuilds the chart. */
  buildOptions: () => Omit<uPlot.Options, 'width' | 'height'>;
  /** Redraws without new data (limits drawn in hooks changed). */
  redrawKey?: unknown;
  className?: string;
  children?: ReactNode;
};

type UPlotConstructor = typeof uPlot;
let uPlotLoad: Promise<UPlotConstructor> | null = null;

// NOTE: uPlot touches matchMedia when evaluated, so it is imported on demand (jsdom has none).
function loadUPlot(): Promise<UPlotConstructor> | null {
  if (typeof window === 'undefined' || typeof window.matchMedia !== 'function') return null;
  uPlotLoad ??= import('uplot').then((module) => module.default);
  return uPlotLoad;
}

export function PlotFigure({ label, summary, height, data, buildOptions, redrawKey, className, children }: PlotFigureProps) {
  const wrapperRef = useRef<HTMLDivElement>(null);
  const hostRef = useRef<HTMLDivElement>(null);
  const chartRef = useRef<uPlot | null>(null);
  const dataRef = useRef(data);
  dataRef.current = data;
  const width = useElementWidth(wrapperRef);

  const hasWidth = width > 0;
  useEffect(() => {
    const host = hostRef.current;
    const loading = loadUPlot();
    if (!host || !hasWidth || !loading) return;
    let cancelled = false;
    let built: uPlot | null = null;
    void loading.then((UPlot) => {
      if (cancelled) return;
      const chart = new UPlot({ ...buildOptions(), width: Math.floor(wrapperRef.current?.clientWidth ?? 600), height }, dataRef.current, host);
      built = chart;
      chartRef.current = chart;
    });
    return () => {
      cancelled = true;
      built?.destroy();
      chartRef.current = null;
    };
  }, [buildOptions, height, hasWidth]);

  useEffect(() => {
    const chart = chartRef.current;
    if (chart && chart.data !== data) chart.setData(data);
  }, [data]);

  useEffect(() => {
    chartRef.current?.redraw(false, true);
  }, [redrawKey]);

  useEffect(() => {
    const chart = chartRef.current;
    if (chart && width > 0 && chart.width !== width) chart.setSize({ width, height });
  }, [width, height]);

  return (
    <figure aria-label={label} className={cn('relative m-0', className)}>
      {summary ? <figcaption className="sr-only">{summary}</figcaption> : null}
      <div ref={wrapperRef} className="earmark-plot relative" style={{ minHeight: height }}>
        <div ref={hostRef} />
        {children}
      </div>
    </figure>
  );
}
